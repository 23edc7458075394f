using System.Numerics;
using MathNet.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Numerics;

/// <summary>The outcome of a structural test; <see cref="Witness"/> names an eigenvalue that fails it.</summary>
public sealed record PropertyTest(bool Holds, Complex Witness);

/// <summary>
/// Controllability, stabilisability and detectability tests on (A, B) and (A, C).
/// Every decomposition here is handed finite input scaled by a power of two so that its largest entry is in
/// [1, 2): the norms computed inside cannot overflow (a 1e200 entry once left the complex SVD spinning),
/// and the eigen and singular values scale back exactly. An iteration that still does not converge ends in a
/// <see cref="NumericScaleException"/>.
/// </summary>
public static class SystemProperties
{
    /// <summary>Relative tolerance for numerical rank: σ ≤ tol·σ_max counts as zero.</summary>
    public const double RankTolerance = 1e-9;

    /// <summary>Eigenvalues with |λ| ≥ 1 − margin count as not asymptotically stable in the PBH tests.</summary>
    public const double UnitCircleMargin = 1e-9;

    /// <exception cref="NumericScaleException">A has a non-finite entry, the iteration did not converge, or an eigenvalue overflows.</exception>
    public static Complex[] Eigenvalues(Matrix<double> a)
    {
        RequireFinite(a, "the matrix");
        int exponent = MatrixScale.Exponent(MatrixScale.MaxAbs(a));
        Complex[] values;
        try
        {
            values = MatrixScale.ScaleDown(a, exponent).Evd().EigenValues.ToArray();
        }
        catch (NonConvergenceException ex)
        {
            throw new NumericScaleException("the eigenvalue iteration did not converge", ex);
        }

        for (int i = 0; i < values.Length; i++)
        {
            values[i] = new Complex(Math.ScaleB(values[i].Real, exponent), Math.ScaleB(values[i].Imaginary, exponent));
            if (!double.IsFinite(values[i].Real) || !double.IsFinite(values[i].Imaginary))
            {
                throw new NumericScaleException("an eigenvalue is beyond the double range");
            }
        }

        return values;
    }

    /// <exception cref="NumericScaleException">See <see cref="Eigenvalues"/>.</exception>
    public static double SpectralRadius(Matrix<double> a) => Eigenvalues(a).Select(z => z.Magnitude).DefaultIfEmpty(0).Max();

    /// <summary>
    /// Numerical rank of the controllability matrix [B, AB, …, A^{n−1}B]. Each block is scaled to unit
    /// norm first so that powers of a large A do not swamp the small singular values; A itself is scaled by a
    /// power of two, which changes no block's direction.
    /// </summary>
    /// <exception cref="NumericScaleException">A or B has a non-finite entry, or the SVD did not converge.</exception>
    public static int ControllabilityRank(Matrix<double> a, Matrix<double> b)
    {
        RequireFinite(a, "A");
        RequireFinite(b, "B");
        int n = a.RowCount;
        int m = b.ColumnCount;
        var aUnit = MatrixScale.ScaleDown(a, MatrixScale.Exponent(MatrixScale.MaxAbs(a)));
        var k = Matrix<double>.Build.Dense(n, n * m);
        var block = MatrixScale.ScaleDown(b, MatrixScale.Exponent(MatrixScale.MaxAbs(b)));
        for (int i = 0; i < n; i++)
        {
            double norm = block.FrobeniusNorm();
            if (norm > 0)
            {
                block /= norm;
            }

            k.SetSubMatrix(0, i * m, block);
            block = aUnit * block;
        }

        try
        {
            // K is n×nm: its singular values are those of the n×n triangle of a thin QR of Kᵀ. Taking them from the
            // triangle keeps the work and memory at O(n²·nm) and O(n·nm); a direct SVD of K allocates its (nm)² factor.
            var triangle = k.Transpose().QR(MathNet.Numerics.LinearAlgebra.Factorization.QRMethod.Thin).R;
            return NumericalRank(triangle.Svd(computeVectors: false).S.ToArray());
        }
        catch (NonConvergenceException ex)
        {
            throw new NumericScaleException("the singular value iteration for the controllability rank did not converge", ex);
        }
    }

    /// <summary>PBH: rank [A − λI, B] = n for every eigenvalue with |λ| ≥ 1.</summary>
    /// <exception cref="NumericScaleException">A or B has a non-finite entry, or an iteration did not converge.</exception>
    public static PropertyTest Stabilisable(Matrix<double> a, Matrix<double> b) =>
        Pbh(a, b);

    /// <summary>PBH: rank [A − λI; W] = n for every eigenvalue with |λ| ≥ 1, W the weighted output map (e.g. CᵀQC).</summary>
    /// <exception cref="NumericScaleException">A or W has a non-finite entry, or an iteration did not converge.</exception>
    public static PropertyTest Detectable(Matrix<double> a, Matrix<double> w) =>
        Pbh(a.Transpose(), w.Transpose());

    private static PropertyTest Pbh(Matrix<double> a, Matrix<double> b)
    {
        RequireFinite(a, "A");
        RequireFinite(b, "the second matrix");
        int n = a.RowCount;
        int m = b.ColumnCount;

        // rank [A − λI, B] = rank [A − λI, B·D] for any invertible D, so B is scaled on its own: the test then
        // does not depend on the input's (or, for detectability, the output weight's) units. A and λ share one
        // power of two. The threshold is relative to the scaled blocks; a mode is only tested when |λ| ≥ 1 − margin,
        // so ‖A‖_F ≥ ~1 there and the former floor of 1 on the scale never applied.
        int exponent = MatrixScale.Exponent(MatrixScale.MaxAbs(a));
        var aUnit = MatrixScale.ScaleDown(a, exponent);
        var bUnit = MatrixScale.ScaleDown(b, MatrixScale.Exponent(MatrixScale.MaxAbs(b)));
        double scale = Math.Max(aUnit.FrobeniusNorm(), bUnit.FrobeniusNorm());
        foreach (var lambda in Eigenvalues(a))
        {
            if (lambda.Magnitude < 1 - UnitCircleMargin)
            {
                continue;
            }

            var lambdaUnit = new Complex(Math.ScaleB(lambda.Real, -exponent), Math.ScaleB(lambda.Imaginary, -exponent));
            var test = Matrix<Complex>.Build.Dense(n, n + m);
            for (int i = 0; i < n; i++)
            {
                for (int j = 0; j < n; j++)
                {
                    test[i, j] = aUnit[i, j] - (i == j ? lambdaUnit : Complex.Zero);
                }

                for (int j = 0; j < m; j++)
                {
                    test[i, n + j] = bUnit[i, j];
                }
            }

            double[] s;
            try
            {
                s = test.Svd(computeVectors: false).S.Select(z => z.Magnitude).ToArray();
            }
            catch (NonConvergenceException ex)
            {
                throw new NumericScaleException("the singular value iteration of the PBH test did not converge", ex);
            }

            double smallest = s.Length >= n ? s[n - 1] : 0;
            if (smallest <= RankTolerance * scale)
            {
                return new PropertyTest(false, lambda);
            }
        }

        return new PropertyTest(true, Complex.Zero);
    }

    private static void RequireFinite(Matrix<double> m, string what)
    {
        if (!MatrixScale.AllFinite(m))
        {
            throw new NumericScaleException($"{what} has a non-finite entry");
        }
    }

    private static int NumericalRank(double[] singularValues)
    {
        if (singularValues.Length == 0 || singularValues[0] == 0)
        {
            return 0;
        }

        double threshold = RankTolerance * singularValues[0];
        return singularValues.Count(s => s > threshold);
    }
}
