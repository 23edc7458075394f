using FsCheck.Xunit;
using Lookahead.Core.Planning;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

/// <summary>
/// When every limit is present, the interior point's row passes run as straight loops over contiguous blocks. They
/// must write exactly what the general per-row passes write — row values, their steps, Gᵀλ and the barrier sums — with
/// and without the Δu_0 rows. FsCheck draws the seed; each seed draws sizes, limits and a random point.
/// </summary>
public class ContiguousLimitRowsTests
{
    [Property(MaxTest = 100)]
    public void ContiguousPassesEqualTheGeneralPasses(int seed)
    {
        var random = new Random(seed);
        int n = random.Next(1, 6);
        int m = random.Next(1, 6);
        int ns = random.Next(0, 4);
        int horizon = random.Next(1, 12);
        double[] inputMin = Values(random, m, -2, -1);
        double[] inputMax = Values(random, m, 1, 2);
        double[] rateMin = Values(random, m, -1, -0.1);
        double[] rateMax = Values(random, m, 0.1, 1);
        double[] softMin = Values(random, ns, -3, -1);
        double[] softMax = Values(random, ns, 1, 3);
        int[] softOutputs = Enumerable.Range(0, ns).ToArray();
        double[] cs = Values(random, ns * n, -1, 1);
        var contiguous = new StagewiseLimitRows(horizon, n, inputMin, inputMax, rateMin, rateMax, softOutputs, softMin, softMax);
        var general = new StagewiseLimitRows(horizon, n, inputMin, inputMax, rateMin, rateMax, softOutputs, softMin, softMax, allowContiguous: false);
        Assert.True(contiguous.IsContiguous);
        Assert.False(general.IsContiguous);

        foreach (bool firstRateRows in new[] { true, false })
        {
            var layout = contiguous.Layout(firstRateRows);
            double[] previous = Values(random, m, -1, 1);
            int pointSeed = random.Next();
            var a = Workspace(n, m, ns, horizon, contiguous.MaxRows, pointSeed);
            var b = Workspace(n, m, ns, horizon, contiguous.MaxRows, pointSeed);
            string context = $"seed {seed}: n = {n}, m = {m}, ns = {ns}, N = {horizon}, Δu_0 rows {firstRateRows}";

            contiguous.Values(a, layout, previous);
            general.Values(b, layout, previous);
            AssertEqual(b.RowValue, a.RowValue, layout.Count, context + ", values");

            contiguous.Steps(a, layout);
            general.Steps(b, layout);
            AssertEqual(b.StepRow, a.StepRow, layout.Count, context + ", steps");

            contiguous.SubtractTransposed(a, layout, a.Multiplier, cs);
            general.SubtractTransposed(b, layout, b.Multiplier, cs);
            AssertEqual(b.InputGradient, a.InputGradient, b.InputGradient.Length, context + ", Gᵀλ on u");
            AssertEqual(b.StateGradient, a.StateGradient, b.StateGradient.Length, context + ", Gᵀλ on x");
            AssertEqual(b.SlackGradient, a.SlackGradient, b.SlackGradient.Length, context + ", Gᵀλ on ε");

            contiguous.SumBarriers(a, layout);
            general.SumBarriers(b, layout);
            AssertEqual(b.InputBarrier, a.InputBarrier, b.InputBarrier.Length, context + ", input barrier");
            AssertEqual(b.RateBarrier, a.RateBarrier, b.RateBarrier.Length, context + ", rate barrier");
            AssertEqual(b.OutputBarrierSum, a.OutputBarrierSum, b.OutputBarrierSum.Length, context + ", output barrier sum");
            AssertEqual(b.OutputBarrierDifference, a.OutputBarrierDifference, b.OutputBarrierDifference.Length, context + ", output barrier difference");
            AssertEqual(b.SlackBarrier, a.SlackBarrier, b.SlackBarrier.Length, context + ", slack barrier");
        }
    }

    [Fact]
    public void PartlyLimitedModelsUseTheGeneralPasses()
    {
        var rows = new StagewiseLimitRows(5, 2, [0.0], [double.PositiveInfinity], [-1.0], [1.0], [0], [-1.0], [1.0]);
        Assert.False(rows.IsContiguous);
    }

    private static InteriorPointWorkspace Workspace(int n, int m, int ns, int horizon, int maxRows, int seed)
    {
        var random = new Random(seed);
        var ws = new InteriorPointWorkspace(n, m, ns, horizon, maxRows, new RiccatiWorkspace(n, m, m, ns, horizon));
        foreach (var array in new[] { ws.Inputs, ws.SoftOutputs, ws.Slacks, ws.StepInputs, ws.StepSoftOutputs, ws.StepSlacks, ws.Multiplier, ws.Barrier, ws.InputGradient, ws.StateGradient, ws.SlackGradient })
        {
            for (int i = 0; i < array.Length; i++)
            {
                array[i] = (random.NextDouble() * 4) - 2;
            }
        }

        // Stale sums from an earlier iteration must not leak into the new ones.
        foreach (var array in new[] { ws.InputBarrier, ws.RateBarrier, ws.OutputBarrierSum, ws.OutputBarrierDifference })
        {
            Array.Fill(array, 7.0);
        }

        return ws;
    }

    private static void AssertEqual(double[] expected, double[] actual, int count, string what)
    {
        for (int i = 0; i < count; i++)
        {
            Assert.True(Math.Abs(expected[i] - actual[i]) <= 1e-14 * (1 + Math.Abs(expected[i])), $"{what}[{i}]: general {expected[i]:R}, contiguous {actual[i]:R}");
        }
    }

    private static double[] Values(Random random, int count, double low, double high) =>
        Enumerable.Range(0, count).Select(_ => low + (random.NextDouble() * (high - low))).ToArray();
}
