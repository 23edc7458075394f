using System.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Numerics;

/// <summary>The outcome of a structural test; <see cref="Witness"/> names an eigenvalue that fails it.</summary>
public sealed record PropertyTest(bool Holds, Complex Witness);

/// <summary>Controllability, stabilisability and detectability tests on (A, B) and (A, C).</summary>
public static class SystemProperties
{
    /// <summary>Relative tolerance for numerical rank: σ ≤ tol·σ_max counts as zero.</summary>
    public const double RankTolerance = 1e-9;

    /// <summary>Eigenvalues with |λ| ≥ 1 − margin count as not asymptotically stable in the PBH tests.</summary>
    public const double UnitCircleMargin = 1e-9;

    public static Complex[] Eigenvalues(Matrix<double> a) => a.Evd().EigenValues.ToArray();

    public static double SpectralRadius(Matrix<double> a) => Eigenvalues(a).Select(z => z.Magnitude).DefaultIfEmpty(0).Max();

    /// <summary>
    /// Numerical rank of the controllability matrix [B, AB, …, A^{n−1}B]. Each block is scaled to unit
    /// norm first so that powers of a large A do not swamp the small singular values.
    /// </summary>
    public static int ControllabilityRank(Matrix<double> a, Matrix<double> b)
    {
        int n = a.RowCount;
        int m = b.ColumnCount;
        var k = Matrix<double>.Build.Dense(n, n * m);
        var block = b.Clone();
        for (int i = 0; i < n; i++)
        {
            double norm = block.FrobeniusNorm();
            if (norm > 0)
            {
                block /= norm;
            }

            k.SetSubMatrix(0, i * m, block);
            block = a * block;
        }

        return NumericalRank(k.Svd(computeVectors: false).S.ToArray());
    }

    /// <summary>PBH: rank [A − λI, B] = n for every eigenvalue with |λ| ≥ 1.</summary>
    public static PropertyTest Stabilisable(Matrix<double> a, Matrix<double> b) =>
        Pbh(a, b);

    /// <summary>PBH: rank [A − λI; W] = n for every eigenvalue with |λ| ≥ 1, W the weighted output map (e.g. CᵀQC).</summary>
    public static PropertyTest Detectable(Matrix<double> a, Matrix<double> w) =>
        Pbh(a.Transpose(), w.Transpose());

    private static PropertyTest Pbh(Matrix<double> a, Matrix<double> b)
    {
        int n = a.RowCount;
        int m = b.ColumnCount;
        double scale = Math.Max(1.0, Math.Max(a.FrobeniusNorm(), b.FrobeniusNorm()));
        foreach (var lambda in Eigenvalues(a))
        {
            if (lambda.Magnitude < 1 - UnitCircleMargin)
            {
                continue;
            }

            var test = Matrix<Complex>.Build.Dense(n, n + m);
            for (int i = 0; i < n; i++)
            {
                for (int j = 0; j < n; j++)
                {
                    test[i, j] = a[i, j] - (i == j ? lambda : Complex.Zero);
                }

                for (int j = 0; j < m; j++)
                {
                    test[i, n + j] = b[i, j];
                }
            }

            var s = test.Svd(computeVectors: false).S.Select(z => z.Magnitude).ToArray();
            double smallest = s.Length >= n ? s[n - 1] : 0;
            if (smallest <= RankTolerance * scale)
            {
                return new PropertyTest(false, lambda);
            }
        }

        return new PropertyTest(true, Complex.Zero);
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
