using Lookahead.Core.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// The optimal unconstrained cost as a quadratic form, J* = zᵀMz with z = [x_0; u_{−1}; r; x_s; u_s], so that a
/// first-move-only answer (replay) needs no trajectory. M = M₀ − FᵀH⁻¹F where M₀ is J at U = 0 and F the
/// gradient maps. The order puts the always-present x_0 first and the previous input next, so regulation
/// reads only a leading block of M.
/// </summary>
internal sealed class CostForm
{
    private readonly double[] form;
    private readonly int n;
    private readonly int m;
    private readonly int p;

    public CostForm(Matrix<double> free, Matrix<double> gradientMaps, Matrix<double> gains, int n, int m, int p)
    {
        this.n = n;
        this.m = m;
        this.p = p;
        Size = n + m + p + n + m;

        // F and K = H⁻¹F have columns in the order [x_0; r; x_s; u_s; u_{−1}]; reorder them to z's order.
        int[] order = [.. Enumerable.Range(0, n), .. Enumerable.Range(n + p + n + m, m), .. Enumerable.Range(n, p), .. Enumerable.Range(n + p, n), .. Enumerable.Range(n + p + n, m)];
        var f = Matrix<double>.Build.Dense(gradientMaps.RowCount, Size, (i, j) => gradientMaps[i, order[j]]);
        var k = Matrix<double>.Build.Dense(gains.RowCount, Size, (i, j) => gains[i, order[j]]);
        var total = free - f.TransposeThisAndMultiply(k);
        form = DenseMatrix.RowMajor((total + total.Transpose()) * 0.5);
    }

    public int Size { get; }

    /// <summary>M₀ from its blocks (z order: x_0, u_{−1}, r, x_s, u_s); <paramref name="s"/> null means no Δu_0 term.</summary>
    public static Matrix<double> Assemble(int n, int m, int p, Matrix<double> xx, Matrix<double> xr, Matrix<double> rr, Matrix<double> xxs, Matrix<double> xsxs, Matrix<double> usus, Matrix<double>? s)
    {
        int size = n + m + p + n + m;
        int up = n;
        int r = n + m;
        int xs = n + m + p;
        int us = n + m + p + n;
        var result = Matrix<double>.Build.Dense(size, size);
        result.SetSubMatrix(0, 0, xx);
        result.SetSubMatrix(0, r, xr);
        result.SetSubMatrix(r, 0, xr.Transpose());
        result.SetSubMatrix(r, r, rr);
        result.SetSubMatrix(0, xs, xxs);
        result.SetSubMatrix(xs, 0, xxs.Transpose());
        result.SetSubMatrix(xs, xs, xsxs);
        result.SetSubMatrix(us, us, usus);
        if (s is not null)
        {
            result.SetSubMatrix(up, up, s);
        }

        return result;
    }

    /// <summary>zᵀMz over the leading block that the request fills: x_0, then u_{−1}, then the tracking terms.</summary>
    public double Evaluate(ReadOnlySpan<double> state, ReadOnlySpan<double> previousInput, ReadOnlySpan<double> reference, ReadOnlySpan<double> targetState, ReadOnlySpan<double> targetInput)
    {
        Span<double> z = Size <= 1024 ? stackalloc double[Size] : new double[Size];
        z.Clear();
        state.CopyTo(z);
        int used = n;
        if (!previousInput.IsEmpty)
        {
            previousInput.CopyTo(z[n..]);
            used = n + m;
        }

        if (!reference.IsEmpty)
        {
            reference.CopyTo(z[(n + m)..]);
            targetState.CopyTo(z[(n + m + p)..]);
            targetInput.CopyTo(z[(n + m + p + n)..]);
            used = Size;
        }

        double sum = 0;
        for (int i = 0; i < used; i++)
        {
            if (z[i] != 0)
            {
                sum += z[i] * DenseKernels.Dot(form.AsSpan(i * Size, used), z[..used]);
            }
        }

        return sum;
    }
}
