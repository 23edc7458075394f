using System.Text.Json;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

public class ConstrainedPlanTests
{
    public static IEnumerable<object[]> Cases => Fixtures.CaseNames("constrained_plans.json");

    /// <summary>ε_j at the optimum is the largest violation of output j over y_1 … y_N (or 0).</summary>
    internal static double[] Slacks(CompiledModel model, Plan plan)
    {
        var limits = model.Document.Limits!;
        var result = new List<double>();
        for (int j = 0; j < model.OutputCount; j++)
        {
            double? low = limits.OutputMin?[j];
            double? high = limits.OutputMax?[j];
            if (low is null && high is null)
            {
                continue;
            }

            double worst = 0;
            for (int k = 1; k <= plan.Horizon; k++)
            {
                double y = plan.Outputs[(k * plan.OutputCount) + j];
                worst = Math.Max(worst, Math.Max((low ?? double.NegativeInfinity) - y, y - (high ?? double.PositiveInfinity)));
            }

            result.Add(worst);
        }

        return [.. result];
    }

    // Source: cvxopt.solvers.qp (CVXOPT 1.3.0) on the sparse formulation — states and inputs as unknowns,
    // dynamics as equalities — with P from scipy.linalg.solve_discrete_are (SciPy 1.10.1); fixtures/constrained_plans.json.
    [Theory]
    [MemberData(nameof(Cases))]
    public void MatchesCvxoptOnTheSparseFormulation(string name)
    {
        var c = Fixtures.Case("constrained_plans.json", name);
        double? rho = c.TryGetProperty("linearViolationWeight", out var w) ? w[0].GetDouble() : null;
        var model = ModelCompiler.Compile(c.Model(), new CompileOptions { SoftLimitLinearWeight = rho });
        var request = new PlanRequest(c.GetProperty("state").Vector(), c.OptionalVector("reference"), c.OptionalVector("previousInput"));
        var plan = model.Plan(request);

        Assert.Equal(PlanStatus.Optimal, plan.Status);
        Assertions.Close(c.GetProperty("inputs").Matrix().Flatten(), plan.Inputs, 1e-6, name + ".inputs");
        Assertions.CloseScalar(c.GetProperty("costWithoutPenalty").GetDouble(), plan.Cost, 1e-8, name + ".cost");
        Assertions.CloseScalar(c.GetProperty("cost").GetDouble(), plan.Cost + plan.SoftLimitPenalty, 1e-8, name + ".costWithPenalty");
        var expectedSlack = c.GetProperty("slack").Vector().Where((_, j) => IsLimited(c, j)).ToArray();
        Assertions.Close(expectedSlack, Slacks(model, plan), 1e-6, name + ".slack");
        Kkt.CheckPlan(model, request, plan, rho, Slacks(model, plan));
        if (c.TryGetProperty("targetState", out var xs))
        {
            Assertions.Close(xs.Vector(), plan.Target!.State, 1e-8, name + ".targetState");
        }
    }

    private static bool IsLimited(JsonElement c, int output)
    {
        var limits = c.GetProperty("limits");
        bool Has(string key) => limits.TryGetProperty(key, out var v) && v[output].ValueKind != JsonValueKind.Null;
        return Has("outputMin") || Has("outputMax");
    }

    // Source: the same CVXOPT fixtures. A warm start from the plans of other states (the origin, the state pushed
    // each way, and the state itself again) must still end at the reference solution.
    [Theory]
    [MemberData(nameof(Cases))]
    public void MatchesCvxoptWhenWarmStartedFromOtherStates(string name)
    {
        var c = Fixtures.Case("constrained_plans.json", name);
        double? rho = c.TryGetProperty("linearViolationWeight", out var w) ? w[0].GetDouble() : null;
        var model = ModelCompiler.Compile(c.Model(), new CompileOptions { SoftLimitLinearWeight = rho });
        var state = c.GetProperty("state").Vector();
        var request = new PlanRequest(state, c.OptionalVector("reference"), c.OptionalVector("previousInput"));
        var warm = model.CreateWarmStart();
        foreach (double scale in new[] { 0.0, 1.5, -1.0, 1.0 })
        {
            model.Plan(request with { State = state.Select(v => v * scale).ToArray() }, warm);
            var plan = model.Plan(request, warm);

            Assert.Equal(PlanStatus.Optimal, plan.Status);
            Assertions.Close(c.GetProperty("inputs").Matrix().Flatten(), plan.Inputs, 1e-6, $"{name}.inputs after ×{scale}");
            Assertions.CloseScalar(c.GetProperty("costWithoutPenalty").GetDouble(), plan.Cost, 1e-8, $"{name}.cost after ×{scale}");
            Kkt.CheckPlan(model, request, plan, rho, Slacks(model, plan));
        }
    }

    private static CompiledModel DoubleIntegrator(LimitsSpec limits, int horizon = 20) =>
        ModelCompiler.Compile(TestModels.Discrete([[1.0, 1.0], [0.0, 1.0]], [[0.5], [1.0]], horizon, [1.0, 0.1], [0.1], limits: limits));

    [Fact]
    public void PlanRespectsInputLimits()
    {
        var model = DoubleIntegrator(new LimitsSpec(InputMin: [-0.4], InputMax: [0.3]));
        var plan = model.Plan(new PlanRequest([5.0, -1.0]));
        Assert.Equal(PlanStatus.Optimal, plan.Status);
        Assert.All(plan.Inputs, u => Assert.InRange(u, -0.4 - 1e-12, 0.3 + 1e-12));
        Assert.Contains(plan.ActiveLimits, l => l.Kind == LimitKind.InputMin && l.Step == 0);
        Assert.True(plan.Iterations > 0);
        Kkt.CheckPlan(model, new PlanRequest([5.0, -1.0]), plan, null, []);
    }

    // Limits are checked exactly by the systems that receive the moves: not even a rounding error outside.
    [Fact]
    public void InputsNeverLeaveTheirWindowEvenByRounding()
    {
        var random = new Random(9);
        var (a, b) = TestModels.Random(random, 4, 3, 1.1);
        var model = ModelCompiler.Compile(TestModels.Discrete(a, b, 20, TestModels.Ones(4), [0.1, 0.1, 0.1], limits: new LimitsSpec(InputMin: [0.0, -0.2, 0.0], InputMax: [1.0, 0.2, 0.3])));
        for (int trial = 0; trial < 50; trial++)
        {
            var plan = model.Plan(new PlanRequest(TestModels.RandomVector(random, 4, 3)));
            for (int k = 0; k < plan.Horizon; k++)
            {
                var u = plan.Input(k);
                Assert.InRange(u[0], 0.0, 1.0);
                Assert.InRange(u[1], -0.2, 0.2);
                Assert.InRange(u[2], 0.0, 0.3);
            }
        }
    }

    [Fact]
    public void PlanRespectsRateLimitsFromThePreviousInput()
    {
        var model = DoubleIntegrator(new LimitsSpec(InputRateMin: [-0.1], InputRateMax: [0.1]));
        var request = new PlanRequest([5.0, -1.0], PreviousInput: [0.2]);
        var plan = model.Plan(request);
        double previous = 0.2;
        foreach (double u in plan.Inputs)
        {
            Assert.InRange(u - previous, -0.1 - 1e-12, 0.1 + 1e-12);
            previous = u;
        }

        Kkt.CheckPlan(model, request, plan, null, []);
    }

    [Fact]
    public void UnconstrainedOptimumInsideTheLimitsTakesNoIterations()
    {
        var free = DoubleIntegrator(new LimitsSpec());
        var limited = DoubleIntegrator(new LimitsSpec(InputMin: [-100.0], InputMax: [100.0]));
        var a = free.Plan(new PlanRequest([1.0, 0.0]));
        var b = limited.Plan(new PlanRequest([1.0, 0.0]));
        Assert.Equal(0, b.Iterations);
        Assert.Empty(b.ActiveLimits);
        Assert.Equal(a.Inputs, b.Inputs);
    }

    // Exact softening: when a plan exists that keeps the outputs inside their limits, that plan is returned.
    [Fact]
    public void SoftOutputLimitThatCanBeMetIsMetExactly()
    {
        // From x = 1 moving at −1.5, full braking keeps the position ≥ 0, so the limit −0.05 can be met.
        var request = new PlanRequest([1.0, -1.5]);
        var free = DoubleIntegrator(new LimitsSpec(InputMin: [-1.0], InputMax: [1.0]));
        Assert.True(free.Plan(request).Outputs.Where((_, i) => i % 2 == 0).Min() < -0.1, "precondition: without the output limit the position undershoots");
        var model = DoubleIntegrator(new LimitsSpec(InputMin: [-1.0], InputMax: [1.0], OutputMin: [-0.05, null], OutputViolationWeight: [1e-3, 0.0]));
        var plan = model.Plan(request);
        Assert.Equal(PlanStatus.Optimal, plan.Status);
        Assert.True(plan.MaxOutputViolation <= 1e-9, $"violation {plan.MaxOutputViolation:g3}");
        Assert.Equal(0, plan.SoftLimitPenalty);
        Assert.Contains(plan.ActiveLimits, l => l.Kind == LimitKind.OutputMin);
        Kkt.CheckPlan(model, request, plan, null, Slacks(model, plan));
    }

    [Fact]
    public void SoftOutputLimitThatCannotBeMetIsViolatedAndFlaggedButNeverInfeasible()
    {
        // Moving fast towards a wall the input cannot stop in time.
        var model = DoubleIntegrator(new LimitsSpec(InputMin: [-0.1], InputMax: [0.1], OutputMax: [1.0, null], OutputViolationWeight: [10.0, 0.0]));
        var request = new PlanRequest([0.0, 1.0]);
        var plan = model.Plan(request);
        Assert.Equal(PlanStatus.Optimal, plan.Status);
        Assert.True(plan.MaxOutputViolation > 0.1);
        Assert.Contains(plan.Warnings, w => w.Code == WarningCode.SoftOutputLimitExceeded && w.Output == 0 && Math.Abs(w.Amount!.Value - plan.MaxOutputViolation) < 1e-12);
        Kkt.CheckPlan(model, request, plan, model.ConstrainedWithoutPrevious!.SoftLimits.AutomaticLinearWeight * 1e6, Slacks(model, plan), 1e-6);
    }

    [Fact]
    public void CostOfAPlanThatViolatesASoftLimitIsJAlone()
    {
        // Moving fast towards a wall the input cannot stop in time: the soft limit y_0 ≤ 1 cannot be met.
        var model = DoubleIntegrator(new LimitsSpec(InputMin: [-0.1], InputMax: [0.1], OutputMax: [1.0, null], OutputViolationWeight: [10.0, 0.0]));
        var request = new PlanRequest([0.0, 1.0]);
        var plan = model.Plan(request);
        Assert.True(plan.MaxOutputViolation > 0.1, "precondition: the soft limit is violated");

        // J from the definition on CompiledModel, evaluated here on the plan's own trajectory (no reference, no
        // previous input, no rate weight): Σ_{k<N} y_kᵀQy_k + u_kᵀRu_k + x_NᵀPx_N with Q = diag(1, 0.1), R = 0.1.
        double[] q = [1.0, 0.1];
        double expected = 0;
        for (int k = 0; k < plan.Horizon; k++)
        {
            var y = plan.Output(k);
            expected += (q[0] * y[0] * y[0]) + (q[1] * y[1] * y[1]) + (0.1 * plan.Input(k)[0] * plan.Input(k)[0]);
        }

        var xN = plan.State(plan.Horizon);
        var p = model.TerminalWeight;
        for (int i = 0; i < 2; i++)
        {
            for (int j = 0; j < 2; j++)
            {
                expected += xN[i] * p[i][j] * xN[j];
            }
        }

        Assertions.CloseScalar(expected, plan.Cost, 1e-12, "cost");
        Assert.True(plan.SoftLimitPenalty > 0, $"penalty {plan.SoftLimitPenalty:g3}");
        var move = new double[1];
        Assert.Equal(plan.Cost, model.FirstMove(request, move).Cost);
    }

    [Fact]
    public void RateLimitsThatCannotReachTheInputWindowAreReportedInfeasible()
    {
        var model = DoubleIntegrator(new LimitsSpec(InputMin: [-1.0], InputMax: [1.0], InputRateMin: [-0.2], InputRateMax: [0.2]));
        var plan = model.Plan(new PlanRequest([1.0, 0.0], PreviousInput: [1.8]));
        Assert.Equal(PlanStatus.Infeasible, plan.Status);
        Assert.Contains(plan.Warnings, w => w.Code == WarningCode.FirstMoveRateRelaxed && w.Input == 0);
        Assert.All(plan.Inputs, u => Assert.InRange(u, -1.0, 1.0));
    }

    [Fact]
    public void OnlyTheUnreachableInputHasItsFirstRateLimitRelaxed()
    {
        // Two independent first-order lags. Input 0 was left at 1.8, outside its window [−1, 1] and more than its
        // rate limit 0.2 away from it; input 1 sits at 0 and is asked to move hard by x_1 = 5.
        var model = ModelCompiler.Compile(TestModels.Discrete(
            [[0.9, 0.0], [0.0, 0.8]], [[1.0, 0.0], [0.0, 1.0]], 10, [1.0, 1.0], [0.1, 0.1],
            limits: new LimitsSpec(InputMin: [-1.0, -1.0], InputMax: [1.0, 1.0], InputRateMin: [-0.2, -0.1], InputRateMax: [0.2, 0.1])));
        var request = new PlanRequest([0.0, 5.0], PreviousInput: [1.8, 0.0]);
        var plan = model.Plan(request);

        Assert.Equal(PlanStatus.Infeasible, plan.Status);
        var relaxed = Assert.Single(plan.Warnings, w => w.Code == WarningCode.FirstMoveRateRelaxed);
        Assert.Equal(0, relaxed.Input);
        Assert.InRange(plan.Input(0)[1] - 0.0, -0.1 - 1e-12, 0.1 + 1e-12);
        Assert.All(plan.Inputs, u => Assert.InRange(u, -1.0, 1.0));
        Kkt.CheckPlan(model, request, plan, null, [], relaxedFirstRateInputs: [0]);
    }

    [Fact]
    public void IterationCapIsReportedAndInputsProjected()
    {
        var model = ModelCompiler.Compile(
            TestModels.Discrete([[1.0, 1.0], [0.0, 1.0]], [[0.5], [1.0]], 20, [1.0, 0.1], [0.1], limits: new LimitsSpec(InputMin: [-0.1], InputMax: [0.1], OutputMin: [-1.0, -0.5], OutputMax: [1.0, 0.5], OutputViolationWeight: [1.0, 1.0])),
            new CompileOptions { MaxSolverIterations = 2 });
        var plan = model.Plan(new PlanRequest([5.0, -1.0]));
        Assert.Equal(PlanStatus.IterationLimit, plan.Status);
        Assert.All(plan.Inputs, u => Assert.InRange(u, -0.1, 0.1));
        Assert.Contains(plan.Warnings, w => w.Code == WarningCode.IterationLimit && w.Count == 2);
    }

    [Fact]
    public void APlanStoppedByItsBudgetStillRespectsEveryHardInputAndRateLimit()
    {
        // Far from the origin with tight rate limits: a one-iteration budget stops long before the optimum.
        var limits = new LimitsSpec(InputMin: [-1.0], InputMax: [1.0], InputRateMin: [-0.05], InputRateMax: [0.05], OutputMin: [-1.0, -0.5], OutputMax: [1.0, 0.5], OutputViolationWeight: [1.0, 1.0]);
        var model = ModelCompiler.Compile(
            TestModels.Discrete([[1.0, 1.0], [0.0, 1.0]], [[0.5], [1.0]], 20, [1.0, 0.1], [0.1], limits: limits),
            new CompileOptions { MaxSolverIterations = 1 });
        double previous = 0.3;
        var plan = model.Plan(new PlanRequest([5.0, -1.0], PreviousInput: [previous]));

        Assert.Equal(PlanStatus.IterationLimit, plan.Status);
        Assert.Contains(plan.Warnings, w => w.Code == WarningCode.IterationLimit && w.Count == 1);
        foreach (double u in plan.Inputs)
        {
            Assert.InRange(u, -1.0, 1.0);
            Assert.InRange(u - previous, -0.05 - 1e-15, 0.05 + 1e-15);
            previous = u;
        }
    }

    [Fact]
    public void TargetRespectsInputLimitsAndSaysTheSetpointIsUnreachable()
    {
        // First-order lag x⁺ = 0.9x + 0.1u: holding y = 5 needs u = 5, above the limit 2.
        var model = ModelCompiler.Compile(TestModels.Discrete([[0.9]], [[0.1]], 10, [1.0], [0.01], limits: new LimitsSpec(InputMin: [-2.0], InputMax: [2.0])));
        var plan = model.Plan(new PlanRequest([0.0], [5.0]));
        Assert.NotNull(plan.Target);
        Assert.True(plan.Target!.LimitedByInputLimits);
        Assert.False(plan.Target.ReferenceReached);
        Assertions.CloseScalar(2.0, plan.Target.Input[0], 1e-7);
        Assertions.CloseScalar(2.0, plan.Target.State[0], 1e-7);
        Assert.Contains(plan.Warnings, w => w.Code == WarningCode.SetpointOutsideInputLimits && Math.Abs(w.Amount!.Value - 3.0) < 1e-6);
    }
}
