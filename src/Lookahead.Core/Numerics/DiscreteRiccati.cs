using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Numerics;

/// <summary>
/// Solves P = AᵀPA − AᵀPB(R + BᵀPB)⁻¹BᵀPA + Q by the structured doubling algorithm
/// (Chu, Fan &amp; Lin, "A structure-preserving doubling algorithm for discrete-time algebraic Riccati
/// equations", Linear Algebra Appl. 396, 2005). Each step doubles the horizon of the underlying
/// Riccati recursion, so convergence is quadratic when a stabilising solution exists.
/// </summary>
public static class DiscreteRiccati
{
    public const int MaxIterations = 100;

    /// <summary>Residual above which a computed solution is refused.</summary>
    public const double AcceptableResidual = 1e-8;

    /// <summary>Returns the stabilising solution for A (n×n), B (n×m), Q ⪰ 0 (n×n), R ≻ 0 (m×m).</summary>
    /// <exception cref="RiccatiException">(A, B) is not stabilisable, or no stabilising solution exists.</exception>
    public static RiccatiSolution Solve(Matrix<double> a, Matrix<double> b, Matrix<double> q, Matrix<double> r)
    {
        int n = a.RowCount;
        var stabilisability = SystemProperties.Stabilisable(a, b);
        if (!stabilisability.Holds)
        {
            throw new RiccatiException($"(A, B) is not stabilisable: the mode at λ = {Format(stabilisability.Witness)} cannot be moved by any input, so no stabilising terminal weight exists");
        }

        var identity = Matrix<double>.Build.DenseIdentity(n);
        var ak = a.Clone();
        var gk = b * r.Cholesky().Solve(b.Transpose());
        var hk = q.Clone();
        int iterations = 0;
        bool converged = false;
        for (; iterations < MaxIterations && !converged; iterations++)
        {
            var w = identity + gk * hk;
            var lu = w.LU();
            var wInvA = lu.Solve(ak);
            var wInvG = lu.Solve(gk);
            var hNext = hk + ak.TransposeThisAndMultiply(hk * wInvA);
            var gNext = gk + ak * wInvG * ak.Transpose();
            ak = ak * wInvA;
            hNext = Symmetrise(hNext);
            gk = Symmetrise(gNext);
            double change = (hNext - hk).FrobeniusNorm();
            double size = hNext.FrobeniusNorm();
            hk = hNext;
            if (!double.IsFinite(size))
            {
                break;
            }

            converged = change <= 1e-15 * Math.Max(size, double.Epsilon) || ak.FrobeniusNorm() <= 1e-300;
        }

        if (!converged || hk.Enumerate().Any(v => !double.IsFinite(v)))
        {
            throw new RiccatiException($"the Riccati doubling iteration did not converge in {MaxIterations} steps: a mode on the unit circle is probably unobservable through the output weight, so no stabilising solution exists");
        }

        var p = hk;
        var gain = GainFor(a, b, r, p);
        double residual = RelativeResidual(a, b, q, r, p);
        double radius = SystemProperties.SpectralRadius(a - b * gain);
        if (!(radius < 1.0 - SystemProperties.UnitCircleMargin) || residual > AcceptableResidual)
        {
            throw new RiccatiException($"no stabilising Riccati solution: closed-loop spectral radius {radius:g6}, relative residual {residual:g3}");
        }

        return new RiccatiSolution(p, gain, residual, radius, iterations);
    }

    /// <summary>K = (R + BᵀPB)⁻¹BᵀPA.</summary>
    public static Matrix<double> GainFor(Matrix<double> a, Matrix<double> b, Matrix<double> r, Matrix<double> p)
    {
        var btp = b.TransposeThisAndMultiply(p);
        return Symmetrise(r + btp * b).Cholesky().Solve(btp * a);
    }

    /// <summary>‖AᵀPA − P − AᵀPB(R + BᵀPB)⁻¹BᵀPA + Q‖_F over the sum of the norms of its large terms.</summary>
    public static double RelativeResidual(Matrix<double> a, Matrix<double> b, Matrix<double> q, Matrix<double> r, Matrix<double> p)
    {
        var atpa = a.TransposeThisAndMultiply(p * a);
        var atpb = a.TransposeThisAndMultiply(p * b);
        var correction = atpb * GainFor(a, b, r, p);
        var residual = atpa - p - correction + q;
        double scale = atpa.FrobeniusNorm() + p.FrobeniusNorm() + q.FrobeniusNorm();
        return scale == 0 ? 0 : residual.FrobeniusNorm() / scale;
    }

    private static Matrix<double> Symmetrise(Matrix<double> m) => (m + m.Transpose()) * 0.5;

    private static string Format(System.Numerics.Complex z) =>
        Math.Abs(z.Imaginary) < 1e-12 ? $"{z.Real:g6}" : $"{z.Real:g6}{(z.Imaginary >= 0 ? "+" : "−")}{Math.Abs(z.Imaginary):g6}i";
}
