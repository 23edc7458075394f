using Lookahead.Core.Optimization;
using Xunit;

namespace Lookahead.Core.Tests.Optimization;

/// <summary>
/// The range-space method's pass over every row takes a mirrored row's value from the row it mirrors. These check the
/// pass's values against each row's own product n_jᵀx/‖n_j‖, and that mirrors are found where (and only where) a row
/// is another's negation apart from a shared tail.
/// </summary>
public class RowSweepTests
{
    [Fact]
    public void ValuesMatchEachRowsOwnProduct()
    {
        var random = new Random(31);
        for (int trial = 0; trial < 50; trial++)
        {
            var (rows, planted) = RandomRows(random, shuffle: trial % 2 == 0);
            var sweep = new RowSweep(rows, Enumerable.Range(0, rows.RowCount).Select(j => 1 / rows.Norm(j)).ToArray());
            Assert.Equal(planted, sweep.MirrorCount);
            Assert.Equal(Enumerable.Range(0, rows.RowCount), sweep.Order.Order());
            for (int j = 0; j < rows.RowCount; j++)
            {
                Assert.Equal(j, sweep.Order[sweep.Position[j]]);
            }

            var x = Enumerable.Range(0, rows.ColumnCount).Select(_ => (2 * random.NextDouble()) - 1).ToArray();
            var values = new double[rows.RowCount];
            Values(sweep, x, values);
            for (int j = 0; j < rows.RowCount; j++)
            {
                double expected = rows.Dot(j, x) / rows.Norm(j);
                Assert.True(Math.Abs(values[sweep.Position[j]] - expected) <= 1e-13 * (1 + Math.Abs(expected)), $"trial {trial}, row {j}: {values[sweep.Position[j]]} against {expected}");
            }
        }
    }

    [Fact]
    public void NearMirrorsAreNotTakenForMirrors()
    {
        // A bound and a scaled opposite bound, two rate rows with one sign not flipped, two long rows with different
        // columns, and a long row whose negation breaks before half its entries: none mirrors another.
        var rows = new SparseRows(8,
        [
            [(0, 1.0)], [(0, -2.0)],
            [(1, 1.0), (2, -1.0)], [(1, -1.0), (2, -1.0)],
            [(0, 1.0), (1, 2.0), (2, 3.0), (3, 4.0), (4, 5.0)], [(0, -1.0), (1, -2.0), (2, -3.0), (3, -4.0), (5, -5.0)],
            [(0, 1.0), (1, 2.0), (2, 3.0), (3, 4.0), (4, 5.0), (5, 6.0), (6, 7.0), (7, 8.0)],
            [(0, -1.0), (1, -2.0), (2, -3.0), (3, 4.0), (4, 5.0), (5, 6.0), (6, 7.0), (7, 8.0)],
        ]);
        var sweep = new RowSweep(rows, Enumerable.Range(0, rows.RowCount).Select(j => 1 / rows.Norm(j)).ToArray());
        Assert.Equal(0, sweep.MirrorCount);
        var x = new[] { 0.3, -0.7, 1.1, 0.2, -0.4, 0.9, -1.3, 0.5 };
        var values = new double[rows.RowCount];
        Values(sweep, x, values);
        for (int j = 0; j < rows.RowCount; j++)
        {
            Assert.Equal(rows.Dot(j, x) / rows.Norm(j), values[sweep.Position[j]], 14);
        }
    }

    private static unsafe void Values(RowSweep sweep, double[] x, double[] values)
    {
        fixed (double* xp = x, vp = values)
        {
            sweep.Values(xp, vp);
        }
    }

    /// <summary>
    /// Rows shaped like a plan's limits: bounds and rate rows with and without their opposite, long rows with a mirror
    /// sharing a slack entry; in the order a plan lists them (bounds of consecutive inputs, read by loads) or shuffled.
    /// </summary>
    private static (SparseRows Rows, int Mirrors) RandomRows(Random random, bool shuffle)
    {
        int n = random.Next(6, 40);
        var rows = new List<IReadOnlyList<(int, double)>>();
        int mirrors = 0;
        for (int i = 0; i < n - 1; i++)
        {
            double scale = 0.5 + random.NextDouble();
            rows.Add([(i, scale)]);
            if (random.NextDouble() < 0.8)
            {
                rows.Add([(i, -scale)]);
                mirrors++;
            }
        }

        for (int i = 1; i < n - 1; i++)
        {
            rows.Add([(i - 1, -1.0), (i, 1.0)]);
            if (random.NextDouble() < 0.8)
            {
                rows.Add([(i - 1, 1.0), (i, -1.0)]);
                mirrors++;
            }
        }

        for (int k = 0; k < random.Next(0, 2 * n); k++)
        {
            int run = random.Next(5, n);
            var row = Enumerable.Range(0, run).Select(j => (j, (2 * random.NextDouble()) - 1)).ToList();
            rows.Add([.. row, (n - 1, 1.0)]);
            if (random.NextDouble() < 0.7)
            {
                rows.Add([.. row.Select(e => (e.Item1, -e.Item2)), (n - 1, 1.0)]);
                mirrors++;
            }
        }

        // Shuffled, a row's mirror may come before or after it, anywhere.
        var ordered = shuffle ? rows.OrderBy(_ => random.Next()).ToList() : rows;
        return (new SparseRows(n, ordered), mirrors);
    }
}
