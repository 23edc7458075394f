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

            return Ratio(values);
        }

        // Power iteration on H and, through the factor, on H⁻¹: accurate to a few digits, which is all a warning needs.
        double largest = PowerIteration(
            v =>
            {
                var product = hessian * Vector<double>.Build.DenseOfArray(v);
                product.CopyTo(Vector<double>.Build.Dense(v));
            },
            hessian.RowCount);
        double inverseLargest = PowerIteration(v => factor.Solve(v), hessian.RowCount);
        return Product(largest, inverseLargest);
    }

    /// <summary>
    /// The same estimate on the compiler's arrays: exact eigenvalues of <paramref name="hessian"/> when the size is
    /// at most <see cref="ExactUpTo"/>, else power iteration on H = LLᵀ and H⁻¹ through the factor.
    /// </summary>
    /// <param name="hessian">H (size × size, column-major, lower triangle read) when size ≤ <see cref="ExactUpTo"/>, else
    /// null. Destroyed.</param>
    /// <param name="lower">L with H = LLᵀ in the lower triangle of a size × size column-major array.</param>
    /// <exception cref="NumericScaleException">As for <see cref="Compute(Matrix{double}, CholeskyFactor)"/>.</exception>
    public static double Compute(DenseLinearAlgebra algebra, int size, double[]? hessian, double[] lower)
    {
        if (size <= ExactUpTo)
        {
            if (hessian is null || hessian.Length != size * size)
            {
                throw new ArgumentException($"the exact path needs H as a {size}×{size} array", nameof(hessian));
            }

            if (!DenseKernels.AllFinite(hessian))
            {
                throw new NumericScaleException("the condensed Hessian has a non-finite entry");
            }

            double largestEntry = 0;
            foreach (double v in hessian)
            {
                largestEntry = Math.Max(largestEntry, Math.Abs(v));
            }

            int exponent = MatrixScale.Exponent(largestEntry);
            if (exponent != 0)
            {
                for (int i = 0; i < hessian.Length; i++)
                {
                    hessian[i] = Math.ScaleB(hessian[i], -exponent);
                }
            }

            return Ratio(algebra.SymmetricEigenvalues(hessian, size, size));
        }

        double largest = PowerIteration(
            v =>
            {
                algebra.MultiplyLowerVector(true, size, lower, size, v);
                algebra.MultiplyLowerVector(false, size, lower, size, v);
            },
            size);
        double inverseLargest = PowerIteration(
            v =>
            {
                algebra.SolveLowerVector(false, size, lower, size, v);
                algebra.SolveLowerVector(true, size, lower, size, v);
            },
            size);
        return Product(largest, inverseLargest);
    }

    private static double Ratio(double[] values)
    {
        double min = values.Min();
        return min > 0 ? values.Max() / min : double.PositiveInfinity;
    }

    private static double Product(double largest, double inverseLargest)
    {
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

    /// <summary>The Rayleigh quotient of <paramref name="apply"/> (which maps its argument in place) after power iteration.</summary>
    private static double PowerIteration(Action<double[]> apply, int size)
    {
        // A fixed, not quite uniform start: deterministic, and never orthogonal to a dominant eigenvector that is
        // itself uniform or alternating in sign (as a pure ones vector could be to the latter).
        var v = new double[size];
        for (int i = 0; i < size; i++)
        {
            v[i] = 1.0 + (StartRipple * (i % StartRipplePeriod));
        }

        Scale(v, 1.0 / Norm(v));
        var w = new double[size];
        double estimate = 0;
        for (int k = 0; k < MaxPowerIterations; k++)
        {
            v.CopyTo(w, 0);
            apply(w);
            double next = DenseKernels.Dot(v, w);
            double norm = Norm(w);
            if (!double.IsFinite(norm) || !double.IsFinite(next))
            {
                throw new NumericScaleException("the power iteration for the Hessian's condition number overflowed the double range");
            }

            if (norm == 0)
            {
                return 0;
            }

            Scale(w, 1.0 / norm);
            (v, w) = (w, v);
            if (Math.Abs(next - estimate) <= PowerTolerance * Math.Abs(next))
            {
                return next;
            }

            estimate = next;
        }

        return estimate;
    }

    /// <summary>‖x‖₂ computed on x/‖x‖∞, so squares of large entries cannot overflow; NaN or ∞ when an entry is.</summary>
    private static double Norm(ReadOnlySpan<double> x)
    {
        double largest = 0;
        foreach (double v in x)
        {
            if (!double.IsFinite(v))
            {
                return double.NaN;
            }

            largest = Math.Max(largest, Math.Abs(v));
        }

        if (largest == 0)
        {
            return 0;
        }

        double sum = 0;
        foreach (double v in x)
        {
            double scaled = v / largest;
            sum += scaled * scaled;
        }

        return largest * Math.Sqrt(sum);
    }

    private static void Scale(Span<double> x, double factor)
    {
        foreach (ref double v in x)
        {
            v *= factor;
        }
    }
}
