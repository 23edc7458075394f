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
    /// <summary>
    /// Bound on doubling steps. Step k covers 2^k stages of the Riccati recursion, so 100 steps are far more
    /// than any solution that exists needs; not settling by then means a mode on or near the unit circle.
    /// </summary>
    public const int MaxIterations = 100;

    /// <summary>Residual above which a computed solution is refused.</summary>
    public const double AcceptableResidual = 1e-8;

    /// <summary>Converged when one step changes H_k by at most this fraction of its norm: a few units of rounding.</summary>
    public const double ConvergenceTolerance = 1e-15;

    /// <summary>Converged when ‖A_k‖_F falls below this: A_kᵀ·H·A_k can no longer change H_k in double precision.</summary>
    public const double NegligibleTransition = 1e-300;

    /// <summary>Returns the stabilising solution for A (n×n), B (n×m), Q ⪰ 0 (n×n), R ≻ 0 (m×m).</summary>
    /// <exception cref="ArgumentException">An input has a non-finite entry.</exception>
    /// <exception cref="RiccatiException">
    /// (A, B) is not stabilisable, no stabilising solution exists, or the iteration overflows the double range
    /// (the scales of the data are too far apart for the solution to be represented).
    /// </exception>
    /// <exception cref="NumericScaleException">An eigenvalue or singular value iteration did not converge.</exception>
    public static RiccatiSolution Solve(Matrix<double> a, Matrix<double> b, Matrix<double> q, Matrix<double> r)
    {
        foreach (var (m, name) in new[] { (a, nameof(a)), (b, nameof(b)), (q, nameof(q)), (r, nameof(r)) })
        {
            if (!MatrixScale.AllFinite(m))
            {
                throw new ArgumentException("the matrix must be finite", name);
            }
        }

        int n = a.RowCount;
        var stabilisability = SystemProperties.Stabilisable(a, b);
        if (!stabilisability.Holds)
        {
            throw new RiccatiException($"(A, B) is not stabilisable: the mode at λ = {Format(stabilisability.Witness)} cannot be moved by any input, so no stabilising terminal weight exists");
        }

        var identity = Matrix<double>.Build.DenseIdentity(n);
        var ak = a.Clone();
        var gk = b * Factor(r, "R").Solve(b.Transpose());
        var hk = q.Clone();
        if (!MatrixScale.AllFinite(gk))
        {
            throw Overflow(0);
        }

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

            // Stop at the first non-finite entry: later steps would only carry NaN forward.
            if (!MatrixScale.AllFinite(hNext) || !MatrixScale.AllFinite(gk) || !MatrixScale.AllFinite(ak))
            {
                throw Overflow(iterations + 1);
            }

            // Norms of the power-of-two-scaled iterate: finite entries near the top of the range must not overflow the test.
            int exponent = MatrixScale.Exponent(MatrixScale.MaxAbs(hNext));
            double change = MatrixScale.ScaleDown(hNext - hk, exponent).FrobeniusNorm();
            double size = MatrixScale.ScaleDown(hNext, exponent).FrobeniusNorm();
            hk = hNext;
            converged = change <= ConvergenceTolerance * Math.Max(size, double.Epsilon) || ak.FrobeniusNorm() <= NegligibleTransition;
        }

        if (!converged)
        {
            throw new RiccatiException($"the Riccati doubling iteration did not converge in {MaxIterations} steps: a mode on the unit circle is probably unobservable through the output weight, so no stabilising solution exists");
        }

        var p = hk;
        Matrix<double> gain;
        try
        {
            gain = GainFor(a, b, r, p);
        }
        catch (ArgumentException ex)
        {
            throw new RiccatiException("R + BᵀPB is not numerically positive definite, so the feedback gain does not exist in double precision", ex);
        }

        double residual = RelativeResidual(a, b, q, r, p);
        if (!MatrixScale.AllFinite(gain) || !double.IsFinite(residual))
        {
            throw new RiccatiException("the feedback gain or the residual of the Riccati solution overflows the double range: the scales of Q, R and B are too far apart for a usable solution");
        }

        double radius = SystemProperties.SpectralRadius(a - b * gain);
        if (!(radius < 1.0 - SystemProperties.UnitCircleMargin) || !(residual <= AcceptableResidual))
        {
            throw new RiccatiException($"no stabilising Riccati solution: closed-loop spectral radius {radius:g6}, relative residual {residual:g3}");
        }

        return new RiccatiSolution(p, gain, residual, radius, iterations);
    }

    private static MathNet.Numerics.LinearAlgebra.Factorization.Cholesky<double> Factor(Matrix<double> m, string name)
    {
        try
        {
            return m.Cholesky();
        }
        catch (ArgumentException ex)
        {
            throw new RiccatiException($"{name} is not numerically positive definite", ex);
        }
    }

    private static RiccatiException Overflow(int step) => new(
        $"the doubling iteration overflowed the double range at step {step}: the scales of Q, R and B are too far apart for the solution to be represented");

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

    /// <summary>An eigenvalue's imaginary part below this is shown as a real number in messages (display only).</summary>
    private const double ShownAsReal = 1e-12;

    private static string Format(System.Numerics.Complex z) =>
        Math.Abs(z.Imaginary) < ShownAsReal ? $"{z.Real:g6}" : $"{z.Real:g6}{(z.Imaginary >= 0 ? "+" : "−")}{Math.Abs(z.Imaginary):g6}i";
}
