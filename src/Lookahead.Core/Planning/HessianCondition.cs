using Lookahead.Core.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>λ_max/λ_min of a symmetric positive definite matrix.</summary>
internal static class HessianCondition
{
    /// <summary>Up to this size the eigenvalues are computed exactly; above it, by power iteration.</summary>
    public const int ExactUpTo = 600;

    public static double Compute(Matrix<double> hessian, CholeskyFactor factor)
    {
        if (hessian.RowCount <= ExactUpTo)
        {
            var values = hessian.Evd(Symmetricity.Symmetric).EigenValues.Select(z => z.Real).ToArray();
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
        return largest * inverseLargest;
    }

    private static double PowerIteration(Func<Vector<double>, Vector<double>> apply, int size)
    {
        var v = Vector<double>.Build.Dense(size, i => 1.0 + (0.01 * (i % 7)));
        v /= v.L2Norm();
        double estimate = 0;
        for (int k = 0; k < 200; k++)
        {
            var w = apply(v);
            double next = v.DotProduct(w);
            double norm = w.L2Norm();
            if (norm == 0)
            {
                return 0;
            }

            v = w / norm;
            if (Math.Abs(next - estimate) <= 1e-6 * Math.Abs(next))
            {
                return next;
            }

            estimate = next;
        }

        return estimate;
    }
}
