using FsCheck.Xunit;
using Lookahead.Core.Planning;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

/// <summary>
/// The 4×4-tile Riccati recursion for small models (n, m, ns ≤ 4) must give the same Newton step as the general row
/// updates it replaces, for any sizes it accepts, with and without the rate coupling and u_{−1}. FsCheck draws the
/// seed; each seed builds random weights, barrier weights and gradients.
/// </summary>
public class TiledRiccatiStepTests
{
    [Property(MaxTest = 200)]
    public void TiledStepEqualsTheGeneralStep(int seed)
    {
        var random = new Random(seed);
        int n = random.Next(1, 5);
        int m = random.Next(1, 5);
        int ns = random.Next(0, 5);
        int horizon = random.Next(1, 40);
        bool rate = random.Next(2) == 0;
        bool hasPrevious = random.Next(2) == 0;
        double[] a = Uniform(random, n * n, 1.2);
        double[] b = Uniform(random, n * m, 1);
        double[] qx = PositiveDefinite(random, n, 0.01);
        double[] r = PositiveDefinite(random, m, 0.1);
        double[] s = rate ? PositiveDefinite(random, m, 0.1) : new double[m * m];
        double[] terminal = PositiveDefinite(random, n, 0.5);
        double[] cs = Uniform(random, ns * n, 1);
        double[] slackWeights = Uniform(random, ns, 1).Select(Math.Abs).ToArray();

        var tiled = new RiccatiNewtonStep(horizon, a, b, qx, r, s, terminal, cs, slackWeights, rate);
        var general = new RiccatiNewtonStep(horizon, a, b, qx, r, s, terminal, cs, slackWeights, rate, allowTiles: false);
        Assert.True(tiled.IsTiled || !Tile.IsSupported);
        Assert.False(general.IsTiled);

        // Barrier weights spanning ten orders of magnitude, as late interior-point iterations have them.
        var barrierSeed = random.Next();
        var tiledWorkspace = Workspace(tiled, n, m, ns, horizon, barrierSeed);
        var generalWorkspace = Workspace(general, n, m, ns, horizon, barrierSeed);
        Assert.True(tiled.Factor(tiledWorkspace, hasPrevious));
        Assert.True(general.Factor(generalWorkspace, hasPrevious));
        tiled.Solve(tiledWorkspace);
        general.Solve(generalWorkspace);

        string context = $"seed {seed}: n = {n}, m = {m}, ns = {ns}, N = {horizon}, rate coupling {rate}, u₋₁ {hasPrevious}";
        AssertClose(generalWorkspace.StepInputs, tiledWorkspace.StepInputs, context + ", Δu");
        AssertClose(generalWorkspace.StepStates, tiledWorkspace.StepStates, context + ", Δx");
        AssertClose(generalWorkspace.StepSlacks, tiledWorkspace.StepSlacks, context + ", Δε");
    }

    [Fact]
    public void ModelsWiderThanATileUseTheGeneralRecursion()
    {
        var random = new Random(5);
        var step = new RiccatiNewtonStep(10, Uniform(random, 25, 1), Uniform(random, 10, 1), PositiveDefinite(random, 5, 1), PositiveDefinite(random, 2, 1), new double[4], PositiveDefinite(random, 5, 1), [], [], carriesPreviousInput: false);
        Assert.False(step.IsTiled);
    }

    private static InteriorPointWorkspace Workspace(RiccatiNewtonStep step, int n, int m, int ns, int horizon, int seed)
    {
        var random = new Random(seed);
        var ws = new InteriorPointWorkspace(n, m, ns, horizon, 1, step.CreateWorkspace());
        void Fill(double[] values, bool positive)
        {
            for (int i = 0; i < values.Length; i++)
            {
                values[i] = positive ? Math.Pow(10, (random.NextDouble() * 10) - 5) : (random.NextDouble() * 2) - 1;
            }
        }

        Fill(ws.InputBarrier, positive: true);
        Fill(ws.RateBarrier, positive: true);
        Fill(ws.OutputBarrierSum, positive: true);
        Fill(ws.OutputBarrierDifference, positive: false);
        Fill(ws.SlackBarrier, positive: true);
        Fill(ws.InputGradient, positive: false);
        Fill(ws.StateGradient, positive: false);
        Fill(ws.SlackGradient, positive: false);
        for (int k = 0; k <= horizon; k++)
        {
            for (int j = 0; j < ns; j++)
            {
                // |D^lo − D^hi| ≤ D^lo + D^hi, as the barrier sums and differences of real rows are.
                ws.OutputBarrierDifference[(k * ns) + j] *= ws.OutputBarrierSum[(k * ns) + j];
            }
        }

        return ws;
    }

    private static void AssertClose(double[] expected, double[] actual, string what)
    {
        double scale = 1 + expected.Select(Math.Abs).DefaultIfEmpty(0).Max();
        for (int i = 0; i < expected.Length; i++)
        {
            Assert.True(Math.Abs(expected[i] - actual[i]) <= 1e-9 * scale, $"{what}[{i}]: general {expected[i]:R}, tiled {actual[i]:R} (scale {scale:g3})");
        }
    }

    private static double[] Uniform(Random random, int count, double scale) =>
        Enumerable.Range(0, count).Select(_ => ((random.NextDouble() * 2) - 1) * scale).ToArray();

    /// <summary>GGᵀ/k + shift·I for a random k×k G: symmetric positive definite with eigenvalues ≥ shift.</summary>
    private static double[] PositiveDefinite(Random random, int k, double shift)
    {
        double[] g = Uniform(random, k * k, 1);
        var result = new double[k * k];
        for (int i = 0; i < k; i++)
        {
            for (int j = 0; j < k; j++)
            {
                double sum = 0;
                for (int l = 0; l < k; l++)
                {
                    sum += g[(i * k) + l] * g[(j * k) + l];
                }

                result[(i * k) + j] = (sum / k) + (i == j ? shift : 0);
            }
        }

        return result;
    }
}
