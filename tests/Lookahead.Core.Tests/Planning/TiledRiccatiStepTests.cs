using FsCheck.Xunit;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
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

/// <summary>
/// Whole limited plans of small models on the tiled and contiguous paths against the same plans on the general loops:
/// the demo over its operating range, and random small models with every limit or only some of them, rate weights or
/// none, targets or none. The two run the same iteration in another arithmetic order, so they agree to rounding.
/// </summary>
public class SmallModelKernelPlanTests
{
    [Fact]
    public void DemoPlansEqualTheGeneralLoops()
    {
        var model = ModelCompiler.Compile(DemoModel.Document);
        var fast = InteriorPointPlans.Build(model);
        var general = InteriorPointPlans.Build(model, smallModelKernels: false);
        Assert.True(fast.IsTiled || !Tile.IsSupported);
        Assert.False(general.IsTiled);
        foreach (var request in DemoModel.States(32, seed: 23))
        {
            Compare(model, fast, general, request, $"demo x₀ = [{string.Join(", ", request.State.Select(v => v.ToString("g4")))}], u₋₁ {request.PreviousInput is not null}");
        }
    }

    [Property(MaxTest = 60)]
    public void RandomSmallModelPlansEqualTheGeneralLoops(int seed)
    {
        var random = new Random(seed);
        int n = random.Next(1, 5);
        int m = random.Next(1, 5);
        int p = random.Next(1, 5);
        int horizon = random.Next(2, 25);
        var (a, b) = TestModels.Random(random, n, m, 0.6 + (0.6 * random.NextDouble()));
        var c = Enumerable.Range(0, p).Select(_ => TestModels.RandomVector(random, n)).ToArray();
        double[] q = Enumerable.Range(0, p).Select(_ => 0.1 + random.NextDouble()).ToArray();
        double[] r = Enumerable.Range(0, m).Select(_ => 0.05 + random.NextDouble()).ToArray();
        double[]? s = random.Next(2) == 0 ? null : Enumerable.Range(0, m).Select(_ => random.NextDouble()).ToArray();
        bool every = random.Next(2) == 0;
        double?[] Side(int count, double value, bool present) => Enumerable.Range(0, count).Select(i => present || i % 2 == 0 ? value : (double?)null).ToArray();
        var limits = new LimitsSpec(
            Side(m, -1, every), Side(m, 1, every), Side(m, -0.3, every), Side(m, 0.3, every),
            Side(p, -0.5, every || random.Next(2) == 0), Side(p, 0.5, every), Enumerable.Repeat(10.0, p).ToArray());
        var model = ModelCompiler.Compile(TestModels.Discrete(a, b, horizon, q, r, null, c, s, limits));
        var fast = InteriorPointPlans.Build(model);
        var general = InteriorPointPlans.Build(model, smallModelKernels: false);
        var request = new PlanRequest(TestModels.RandomVector(random, n, 3), random.Next(2) == 0 ? null : TestModels.RandomVector(random, p), random.Next(2) == 0 ? null : TestModels.RandomVector(random, m, 0.5));
        Compare(model, fast, general, request, $"seed {seed}: n = {n}, m = {m}, p = {p}, N = {horizon}, every limit {every}, rate weight {s is not null}");
    }

    private static void Compare(CompiledModel model, InteriorPointProblem fast, InteriorPointProblem general, PlanRequest request, string what)
    {
        double[]? targetState = request.Reference is null ? null : model.Plan(request).Target?.State;
        double[]? targetInput = request.Reference is null ? null : model.Plan(request).Target?.Input;
        var (expected, expectedOutcome) = InteriorPointPlans.Solve(model, general, request, targetState, targetInput, null);
        var (actual, actualOutcome) = InteriorPointPlans.Solve(model, fast, request, targetState, targetInput, null);
        Assert.True(expected.Status == actual.Status, $"{what}: status {actual.Status}, general loops {expected.Status}");
        Assert.True(Math.Abs(expectedOutcome.Iterations - actualOutcome.Iterations) <= 1, $"{what}: {actualOutcome.Iterations} iterations, general loops {expectedOutcome.Iterations}");
        double scale = 1 + expected.Inputs.Max(Math.Abs);
        for (int i = 0; i < expected.Inputs.Length; i++)
        {
            Assert.True(Math.Abs(expected.Inputs[i] - actual.Inputs[i]) <= 1e-7 * scale, $"{what}: u[{i}] = {actual.Inputs[i]:R}, general loops {expected.Inputs[i]:R}");
        }

        Assert.True(Math.Abs(expected.Cost - actual.Cost) <= 1e-8 * (1 + Math.Abs(expected.Cost)), $"{what}: cost {actual.Cost:R}, general loops {expected.Cost:R}");
    }
}
