using Lookahead.Core.Numerics;
using MathNet.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>λ_max/λ_min of a symmetric positive definite matrix.</summary>
internal static class HessianCondition
{
    /// <summary>Up to this size the eigenvalues are computed exactly; above it, by power iteration.</summary>
    public const int ExactUpTo = 600;

    /// <summary>
    /// Bound on power-iteration steps. The estimate only decides a warning and whether plans are refined, so a
    /// few correct digits suffice; when 200 steps are not enough the leading eigenvalues nearly coincide, and
    /// the Rayleigh quotient reached is already close to both.
    /// </summary>
    public const int MaxPowerIterations = 200;

    /// <summary>Relative change of the Rayleigh quotient at which the power iteration stops: about six digits.</summary>
    public const double PowerTolerance = 1e-6;

    /// <exception cref="NumericScaleException">
    /// The matrix has a non-finite entry, the eigenvalue iteration did not converge, or the estimate overflows.
    /// </exception>
    public static double Compute(Matrix<double> hessian, CholeskyFactor factor)
    {
        if (!MatrixScale.AllFinite(hessian))
        {
            throw new NumericScaleException("the condensed Hessian has a non-finite entry");
        }

        if (hessian.RowCount <= ExactUpTo)
        {
            // The ratio is scale-free; a power-of-two scaling keeps the eigenvalue iteration's norms in range.
            var scaled = MatrixScale.ScaleDown(hessian, MatrixScale.Exponent(MatrixScale.MaxAbs(hessian)));
            double[] values;
            try
            {
                values = scaled.Evd(Symmetricity.Symmetric).EigenValues.Select(z => z.Real).ToArray();
            }
            catch (NonConvergenceException ex)
            {
                throw new NumericScaleException("the eigenvalue iteration for the Hessian's condition number did not converge", ex);
            }

            double min = values.Min();
            return min > 0 ? values.Max() / min : double.PositiveInfinity;
        }

        // Power iteration on H and, through the factor, on H⁻¹: accurate to a few digits, which is all a warning needs.
        double largest = PowerIteration(v => hessian * v, hessian.RowCount);
        double inverseLargest = PowerIteration(
            v =>
            {
                var copy = v.ToArray();
                factor.Solve(copy);
                return Vector<double>.Build.DenseOfArray(copy);
            },
            hessian.RowCount);
        double condition = largest * inverseLargest;
        if (!double.IsFinite(condition))
        {
            throw new NumericScaleException("the estimate of the Hessian's condition number overflows the double range");
        }

        return condition;
    }

    /// <summary>Size of the ripple on the power iteration's start vector.</summary>
    private const double StartRipple = 0.01;

    /// <summary>Period of the ripple: a prime, so it lines up with no block structure of H.</summary>
    private const int StartRipplePeriod = 7;

    private static double PowerIteration(Func<Vector<double>, Vector<double>> apply, int size)
    {
        // A fixed, not quite uniform start: deterministic, and never orthogonal to a dominant eigenvector that is
        // itself uniform or alternating in sign (as a pure ones vector could be to the latter).
        var v = Vector<double>.Build.Dense(size, i => 1.0 + (StartRipple * (i % StartRipplePeriod)));
        v /= v.L2Norm();
        double estimate = 0;
        for (int k = 0; k < MaxPowerIterations; k++)
        {
            var w = apply(v);
            double next = v.DotProduct(w);
            double norm = w.L2Norm();
            if (!double.IsFinite(norm) || !double.IsFinite(next))
            {
                throw new NumericScaleException("the power iteration for the Hessian's condition number overflowed the double range");
            }

            if (norm == 0)
            {
                return 0;
            }

            v = w / norm;
            if (Math.Abs(next - estimate) <= PowerTolerance * Math.Abs(next))
            {
                return next;
            }

            estimate = next;
        }

        return estimate;
    }
}
