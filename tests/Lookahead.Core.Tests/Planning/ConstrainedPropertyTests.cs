using FsCheck.Xunit;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

/// <summary>
/// Properties of limited plans on random models, states and limits (common practice for convex programs):
/// the answer satisfies KKT; tightening a limit never lowers the optimal cost; soft limits never make a plan infeasible.
/// </summary>
public class ConstrainedPropertyTests
{
    private sealed record Scenario(ModelDocument Document, PlanRequest Request);

    private static Scenario Random(int seed, double tighten = 1.0)
    {
        var random = new Random(seed);
        int n = random.Next(1, 6);
        int m = random.Next(1, 3);
        int p = random.Next(1, n + 1);
        int horizon = random.Next(2, 16);
        var (a, b) = TestModels.Random(random, n, m, 0.6 + random.NextDouble() * 0.8);
        var c = Enumerable.Range(0, p).Select(_ => TestModels.RandomVector(random, n)).ToArray();
        double[] q = Enumerable.Range(0, p).Select(_ => 0.2 + random.NextDouble()).ToArray();
        double[] r = Enumerable.Range(0, m).Select(_ => 0.05 + random.NextDouble()).ToArray();
        double?[] Bound(int size, double sign) => Enumerable.Range(0, size).Select(_ => random.Next(4) == 0 ? (double?)null : sign * (0.2 + random.NextDouble()) * tighten).ToArray();
        var limits = new LimitsSpec(
            Bound(m, -1), Bound(m, 1), Bound(m, -1), Bound(m, 1), Bound(p, -1), Bound(p, 1),
            Enumerable.Range(0, p).Select(_ => 0.1 + random.NextDouble() * 10).ToArray());
        var document = TestModels.Discrete(a, b, horizon, q, r, TerminalWeightSpec.Stage, c, limits: limits);
        var request = new PlanRequest(
            TestModels.RandomVector(random, n, 3),
            null,
            random.Next(2) == 0 ? null : Enumerable.Range(0, m).Select(_ => (random.NextDouble() - 0.5) * 0.3).ToArray());
        return new Scenario(document, request);
    }

    [Property(MaxTest = 80)]
    public void LimitedPlanSatisfiesKkt(int seed)
    {
        var scenario = Random(seed);
        var model = ModelCompiler.Compile(scenario.Document, new CompileOptions { SoftLimitLinearWeight = 1e4 });
        var plan = model.Plan(scenario.Request);
        if (plan.Status == PlanStatus.Optimal)
        {
            Kkt.CheckPlan(model, scenario.Request, plan, 1e4, ConstrainedPlanTests.Slacks(model, plan), 1e-7);
        }
    }

    [Property(MaxTest = 80)]
    public void SoftLimitsNeverMakeAPlanInfeasible(int seed)
    {
        var scenario = Random(seed);
        var model = ModelCompiler.Compile(scenario.Document);
        var plan = model.Plan(scenario.Request);

        // Rate limits validated to contain 0 and a previous input inside the window always leave a feasible plan.
        var previous = scenario.Request.PreviousInput;
        bool previousInsideWindow = previous is null || !model.ConstrainedWithPrevious!.Rows.UnreachableFirstMoves(previous).Any();
        Assert.True(
            !previousInsideWindow || plan.Status == PlanStatus.Optimal,
            $"{Describe(model, scenario)}: status {plan.Status} after {plan.Iterations} iterations, " +
            $"largest soft-limit violation {plan.MaxOutputViolation:g3}; warnings: {string.Join(" | ", plan.Warnings)}");
    }

    [Property(MaxTest = 60)]
    public void TighteningALimitNeverLowersTheCost(int seed)
    {
        var loose = Random(seed, tighten: 1.0);
        var tight = Random(seed, tighten: 0.6);
        // Same plant, weights and state (same seed); only the limits shrink. Hard limits only, so the costs compare J alone.
        ModelDocument HardOnly(ModelDocument d) => d with { Limits = d.Limits! with { OutputMin = null, OutputMax = null, OutputViolationWeight = null } };
        var looseModel = ModelCompiler.Compile(HardOnly(loose.Document));
        var tightModel = ModelCompiler.Compile(HardOnly(tight.Document));
        var request = loose.Request with { PreviousInput = null };
        var a = looseModel.Plan(request);
        var b = tightModel.Plan(request);
        if (a.Status != PlanStatus.Optimal || b.Status != PlanStatus.Optimal)
        {
            return;  // an iteration-limit plan is clipped, not optimal: its cost says nothing about the limits
        }

        Assert.True(
            b.Cost >= a.Cost - (1e-9 * Math.Max(1, a.Cost)),
            $"{Describe(looseModel, loose with { Request = request })}: limits scaled by 0.6 gave cost {b.Cost:R}, below the looser limits' {a.Cost:R} " +
            $"(input min: tight [{Numbers(tight.Document.Limits!.InputMin)}], loose [{Numbers(loose.Document.Limits!.InputMin)}]; " +
            $"input max: tight [{Numbers(tight.Document.Limits.InputMax)}], loose [{Numbers(loose.Document.Limits.InputMax)}])");
    }

    [Property(MaxTest = 60)]
    public void AWarmStartFromAnotherStateEndsAtTheColdPlan(int seed)
    {
        var scenario = Random(seed);
        var other = Random(seed + 7919).Request;
        var model = ModelCompiler.Compile(scenario.Document);
        var warm = model.CreateWarmStart();
        if (other.State.Length == model.StateCount)
        {
            model.Plan(scenario.Request with { State = other.State }, warm);
        }

        // A fresh warm start holds no active set: its first plan is the active set's cold start (a plain cold plan of
        // a small model may go to the interior-point solver instead; that path is held to the active set elsewhere).
        var cold = model.Plan(scenario.Request, model.CreateWarmStart());
        var hot = model.Plan(scenario.Request, warm);
        if (cold.Status == PlanStatus.IterationLimit)
        {
            return; // a plan cut short is the best point so far, which depends on the path by nature
        }

        Assert.Equal(cold.Status, hot.Status);
        double scale = Math.Max(1, cold.Inputs.Max(Math.Abs));
        double gap = cold.Inputs.Zip(hot.Inputs, (x, y) => Math.Abs(x - y)).Max();
        Assert.True(gap <= 1e-9 * scale, $"{Describe(model, scenario)}: warm plan differs from the cold one by {gap:g3}");
    }

    private static string Describe(CompiledModel model, Scenario scenario) =>
        $"n = {model.StateCount}, m = {model.InputCount}, p = {model.OutputCount}, N = {model.Horizon}; " +
        $"x0 = [{Numbers(scenario.Request.State)}], u₋₁ = {(scenario.Request.PreviousInput is { } u ? $"[{Numbers(u)}]" : "none")}";

    private static string Numbers(IEnumerable<double?>? values) =>
        values is null ? "" : string.Join(", ", values.Select(v => v?.ToString("R", System.Globalization.CultureInfo.InvariantCulture) ?? "none"));

    private static string Numbers(IEnumerable<double> values) => Numbers(values.Select(v => (double?)v));
}
