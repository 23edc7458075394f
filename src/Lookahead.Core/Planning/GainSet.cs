using Lookahead.Core.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// The condensed Hessian for one variant of the problem (with or without the Δu_0 term), its Cholesky
/// factor, and the precomputed maps from each request-dependent vector to the unconstrained optimum:
/// U* = −(Kx·x_0 + Kr·r + Kxs·x_s + Kus·u_s + Kup·u_{−1}). All maps column-major with N·m rows (see
/// <see cref="Numerics.DenseKernels.MultiplyAddColumns"/>); immutable after construction.
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

    public long Bytes => sizeof(double) * ((2L * Hessian.RowCount * Hessian.ColumnCount) + Kx.Length + Kr.Length + Kxs.Length + Kus.Length + Kup.Length + ((long)CostForm.Size * CostForm.Size));
}
