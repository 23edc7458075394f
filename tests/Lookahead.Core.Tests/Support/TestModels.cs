using Lookahead.Core.Models;

namespace Lookahead.Core.Tests.Support;

/// <summary>Small models built in code for tests.</summary>
public static class TestModels
{
    public static ModelDocument Discrete(double[][] a, double[][] b, int horizon, double[] q, double[] r, TerminalWeightSpec? terminal = null, double[][]? c = null, double[]? s = null, LimitsSpec? limits = null) =>
        new("test", new PlantSpec(a, b, c, 1.0), new CostSpec(horizon, WeightSpec.FromDiagonal(q), WeightSpec.FromDiagonal(r), s is null ? null : WeightSpec.FromDiagonal(s), terminal), limits);

    public static double[] Ones(int n) => Enumerable.Repeat(1.0, n).ToArray();

    /// <summary>A random n×m plant with spectral radius roughly <paramref name="radius"/>.</summary>
    public static (double[][] A, double[][] B) Random(Random random, int n, int m, double radius)
    {
        var a = new double[n][];
        var b = new double[n][];
        for (int i = 0; i < n; i++)
        {
            a[i] = new double[n];
            b[i] = new double[m];
            for (int j = 0; j < n; j++)
            {
                a[i][j] = (random.NextDouble() * 2 - 1) * radius / Math.Sqrt(n);
            }

            for (int j = 0; j < m; j++)
            {
                b[i][j] = random.NextDouble() * 2 - 1;
            }
        }

        return (a, b);
    }

    public static double[] RandomVector(Random random, int n, double scale = 1) =>
        Enumerable.Range(0, n).Select(_ => (random.NextDouble() * 2 - 1) * scale).ToArray();
}
