using Lookahead.Core.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// The condensed Hessian for one variant of the problem (with or without the Δu_0 term), its Cholesky
/// factor, and the precomputed maps from each request-dependent vector to the unconstrained optimum:
/// U* = −(Kx·x_0 + Kr·r + Kxs·x_s + Kus·u_s + Kup·u_{−1}) (the request in <see cref="RequestLayout"/> order).
/// All maps column-major with N·m rows (see <see cref="DenseKernels.MultiplyAddColumns(ReadOnlySpan{double}, int, ReadOnlySpan{double}, Span{double})"/>);
/// immutable after construction.
/// </summary>
internal sealed class GainSet
{
    public GainSet(Matrix<double> hessian, CholeskyFactor factor, double[] kx, double[] kr, double[] kxs, double[] kus, double[] kup, CostForm costForm)
    {
        CostForm = costForm;
        Hessian = hessian;
        Factor = factor;
        Kx = kx;
        Kr = kr;
        Kxs = kxs;
        Kus = kus;
        Kup = kup;
    }

    /// <summary>H = ΓᵀQ̄Γ + R̄ + DᵀS̄D, so that J(U) = UᵀHU + 2fᵀU + const.</summary>
    public Matrix<double> Hessian { get; }

    /// <summary>Lower-triangular L with H = LLᵀ.</summary>
    public CholeskyFactor Factor { get; }

    /// <summary>J* as a quadratic form of the request, for first-move-only answers.</summary>
    public CostForm CostForm { get; }

    public double[] Kx { get; }

    public double[] Kr { get; }

    public double[] Kxs { get; }

    public double[] Kus { get; }

    public double[] Kup { get; }

    /// <summary>N·m, the rows of every map.</summary>
    public int Rows => Hessian.RowCount;

    /// <summary>
    /// The unconstrained optimum's leading rows: destination = −(Kx·x_0 + Kr·r + Kxs·x_s + Kus·u_s + Kup·u_{−1}) over
    /// the first destination.Length rows — all N·m for a plan, m for the first move alone. An empty
    /// <paramref name="reference"/> drops the Kr, Kxs and Kus terms (the targets are zero then); an empty
    /// <paramref name="previousInput"/> drops Kup.
    /// </summary>
    public void Apply(ReadOnlySpan<double> state, ReadOnlySpan<double> reference, ReadOnlySpan<double> targetState, ReadOnlySpan<double> targetInput, ReadOnlySpan<double> previousInput, Span<double> destination)
    {
        int rows = Rows;
        destination.Clear();
        DenseKernels.MultiplyAddColumns(Kx, rows, state, destination);
        if (!reference.IsEmpty)
        {
            DenseKernels.MultiplyAddColumns(Kr, rows, reference, destination);
            DenseKernels.MultiplyAddColumns(Kxs, rows, targetState, destination);
            DenseKernels.MultiplyAddColumns(Kus, rows, targetInput, destination);
        }

        if (!previousInput.IsEmpty)
        {
            DenseKernels.MultiplyAddColumns(Kup, rows, previousInput, destination);
        }

        for (int i = 0; i < destination.Length; i++)
        {
            destination[i] = -destination[i];
        }
    }

    public long Bytes => sizeof(double) * ((2L * Hessian.RowCount * Hessian.ColumnCount) + Kx.Length + Kr.Length + Kxs.Length + Kus.Length + Kup.Length + ((long)CostForm.Size * CostForm.Size));
}
