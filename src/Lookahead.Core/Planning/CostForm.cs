using Lookahead.Core.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// The optimal unconstrained cost as a quadratic form of the request, J* = zᵀMz with z ordered as
/// <see cref="RequestLayout"/> says, so that a first-move-only answer (replay) needs no trajectory.
/// M = M₀ − FᵀH⁻¹F where M₀ is J at U = 0 and F the gradient maps (built by <see cref="GainSet.Solve"/>).
/// </summary>
internal sealed class CostForm
{
    private readonly double[] form;
    private readonly RequestLayout layout;

    /// <param name="total">M = M₀ − FᵀH⁻¹F, <see cref="RequestLayout.Size"/> square, column-major; symmetrised into
    /// the form (its two triangles differ only by rounding) and not kept.</param>
    public CostForm(ReadOnlySpan<double> total, RequestLayout layout)
    {
        int size = layout.Size;
        if (total.Length != size * size)
        {
            throw new ArgumentException($"the form has {total.Length} entries; expected {size}×{size}", nameof(total));
        }

        this.layout = layout;
        form = new double[size * size];
        for (int i = 0; i < size; i++)
        {
            for (int j = 0; j < size; j++)
            {
                form[(i * size) + j] = (total[(j * size) + i] + total[(i * size) + j]) * 0.5;
            }
        }
    }

    public int Size => layout.Size;

    /// <summary>M₀ from its blocks in <see cref="RequestLayout"/> order; <paramref name="s"/> null means no Δu_0 term.</summary>
    /// <param name="xx">x_0–x_0 block (n×n).</param>
    /// <param name="xr">x_0–r block (n×p).</param>
    /// <param name="rr">r–r block (p×p).</param>
    /// <param name="xxs">x_0–x_s block (n×n).</param>
    /// <param name="xsxs">x_s–x_s block (n×n).</param>
    /// <param name="usus">u_s–u_s block (m×m).</param>
    /// <param name="s">u_{−1}–u_{−1} block (m×m), or null.</param>
    public static Matrix<double> Assemble(int n, int m, int p, Matrix<double> xx, Matrix<double> xr, Matrix<double> rr, Matrix<double> xxs, Matrix<double> xsxs, Matrix<double> usus, Matrix<double>? s)
    {
        var at = new RequestLayout(n, m, p);
        var result = Matrix<double>.Build.Dense(at.Size, at.Size);
        result.SetSubMatrix(at.StateStart, at.StateStart, xx);
        result.SetSubMatrix(at.StateStart, at.ReferenceStart, xr);
        result.SetSubMatrix(at.ReferenceStart, at.StateStart, xr.Transpose());
        result.SetSubMatrix(at.ReferenceStart, at.ReferenceStart, rr);
        result.SetSubMatrix(at.StateStart, at.TargetStateStart, xxs);
        result.SetSubMatrix(at.TargetStateStart, at.StateStart, xxs.Transpose());
        result.SetSubMatrix(at.TargetStateStart, at.TargetStateStart, xsxs);
        result.SetSubMatrix(at.TargetInputStart, at.TargetInputStart, usus);
        if (s is not null)
        {
            result.SetSubMatrix(at.PreviousInputStart, at.PreviousInputStart, s);
        }

        return result;
    }

    /// <summary>
    /// zᵀMz over the blocks the request fills: x_0 always, r with x_s and u_s when a reference is given, u_{−1}
    /// when a previous input is given. Absent blocks are zero and are not read, so regulation costs n² operations.
    /// </summary>
    public double Evaluate(ReadOnlySpan<double> state, ReadOnlySpan<double> reference, ReadOnlySpan<double> targetState, ReadOnlySpan<double> targetInput, ReadOnlySpan<double> previousInput)
    {
        int size = layout.Size;
        Span<double> z = StackScratch.Fits(size) ? stackalloc double[size] : new double[size];
        z.Clear();
        state.CopyTo(z[layout.StateStart..]);

        // The filled entries are one leading run [0, leading) and, with a previous input but no reference, a
        // trailing run for u_{−1} after the empty reference blocks.
        int leading = layout.ReferenceStart;
        if (!reference.IsEmpty)
        {
            reference.CopyTo(z[layout.ReferenceStart..]);
            targetState.CopyTo(z[layout.TargetStateStart..]);
            targetInput.CopyTo(z[layout.TargetInputStart..]);
            leading = layout.PreviousInputStart;
        }

        int trailing = 0;
        if (!previousInput.IsEmpty)
        {
            previousInput.CopyTo(z[layout.PreviousInputStart..]);
            if (reference.IsEmpty)
            {
                trailing = layout.InputCount;
            }
            else
            {
                leading = size;
            }
        }

        int tail = size - trailing;
        double sum = Rows(0, leading, leading, tail, trailing, z);
        return sum + Rows(tail, trailing, leading, tail, trailing, z);
    }

    /// <summary>Σ_{i ∈ [from, from + count)} z_i (M_i,[0,leading) z_[0,leading) + M_i,[tail,tail+trailing) z_[tail,…)).</summary>
    private double Rows(int from, int count, int leading, int tail, int trailing, ReadOnlySpan<double> z)
    {
        int size = layout.Size;
        double sum = 0;
        for (int i = from; i < from + count; i++)
        {
            if (z[i] == 0)
            {
                continue;
            }

            var row = form.AsSpan(i * size, size);
            double product = DenseKernels.Dot(row[..leading], z[..leading]);
            if (trailing > 0)
            {
                product += DenseKernels.Dot(row.Slice(tail, trailing), z.Slice(tail, trailing));
            }

            sum += z[i] * product;
        }

        return sum;
    }
}
