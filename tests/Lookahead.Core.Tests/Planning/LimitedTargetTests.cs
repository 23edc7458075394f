using System.Text.Json;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

/// <summary>
/// The steady-state target under hard input limits follows the same lexicographic rule as without limits:
/// (1) least Q-weighted output error, (2) then least ‖u_s‖, (3) then least ‖x_s‖ — each over the equilibria
/// whose inputs respect the limits.
/// </summary>
public class LimitedTargetTests
{
    public static IEnumerable<object[]> Cases => Fixtures.CaseNames("limited_targets.json");

    // Two decoupled lags, x1⁺ = 0.5x1 + u1 and x2⁺ = 0.9x2 + 0.1u2, seen as y = 0.5x1 + x2. At steady state
    // x1 = 2u1, x2 = u2 and y = u1 + u2: every input pair with u1 + u2 = r holds the setpoint.
    private static CompiledModel TwoLagsOneOutput(double outputWeight, LimitsSpec limits) =>
        ModelCompiler.Compile(TestModels.Discrete(
            [[0.5, 0.0], [0.0, 0.9]],
            [[1.0, 0.0], [0.0, 0.1]],
            horizon: 5,
            q: [outputWeight],
            r: [1.0, 1.0],
            terminal: TerminalWeightSpec.Stage,
            c: [[0.5, 1.0]],
            limits: limits));

    [Fact]
    public void SetpointReachableInsideTheLimitsIsReachedExactlyWhenTheLeastNormInputBreaksALimit()
    {
        // y = 3: the least-norm input (1.5, 1.5) breaks u1 ≤ 1, but u = (1, 2) holds y = 3 inside the limits and is
        // the least-norm input that does (closed form: u1 at its bound, u2 = r − u1); x = (2u1, u2) = (2, 2).
        // A small output weight makes any regularisation of the target visible in the output.
        var model = TwoLagsOneOutput(0.01, new LimitsSpec(InputMin: [-1.0, -10.0], InputMax: [1.0, 10.0]));
        var plan = model.Plan(new PlanRequest([0.0, 0.0], [3.0]));

        var target = plan.Target!;
        Assert.True(target.LimitedByInputLimits);
        Assert.True(target.ReferenceReached, $"output {target.Output[0]:R} for setpoint 3");
        Assert.True(Math.Abs(target.Output[0] - 3.0) <= 1e-9 * 3.0, $"output error {target.Output[0] - 3.0:g3}");
        Assertions.Close([1.0, 2.0], target.Input, 1e-9, "targetInput");
        Assertions.Close([2.0, 2.0], target.State, 1e-9, "targetState");
        Assert.DoesNotContain(plan.Warnings, w => w.Code is WarningCode.SetpointUnreachable or WarningCode.SetpointOutsideInputLimits);
    }

    [Fact]
    public void FreedomLeftAfterALimitBindsGoesToTheLeastNormInput()
    {
        // x1⁺ = 0.5x1 + u1, x2⁺ = 0.9x2 + 0.1u2, x3⁺ = 0.8x3 + 0.2u3 with y1 = 0.5x1 + x2 = u1 + u2 and y2 = x3 = u3 at
        // steady state. r = (4, 3) with u3 ≤ 1: stage 1 puts u3 at its limit (y2 = 1) and keeps y1 = 4; that leaves
        // u1 + u2 = 4 free, and the least-norm choice is u1 = u2 = 2 (closed form), so x = (4, 2, 1). Weighting the
        // states into the tie-break would give u1 = 8/7 instead, because x1 = 2u1 is the larger state.
        var model = ModelCompiler.Compile(TestModels.Discrete(
            [[0.5, 0.0, 0.0], [0.0, 0.9, 0.0], [0.0, 0.0, 0.8]],
            [[1.0, 0.0, 0.0], [0.0, 0.1, 0.0], [0.0, 0.0, 0.2]],
            horizon: 5,
            q: [1.0, 1.0],
            r: [1.0, 1.0, 1.0],
            terminal: TerminalWeightSpec.Stage,
            c: [[0.5, 1.0, 0.0], [0.0, 0.0, 1.0]],
            limits: new LimitsSpec(InputMax: [null, null, 1.0])));
        var plan = model.Plan(new PlanRequest([0.0, 0.0, 0.0], [4.0, 3.0]));

        var target = plan.Target!;
        Assert.True(target.LimitedByInputLimits);
        Assert.False(target.ReferenceReached);
        Assertions.Close([2.0, 2.0, 1.0], target.Input, 1e-9, "targetInput");
        Assertions.Close([4.0, 2.0, 1.0], target.State, 1e-9, "targetState");
        Assertions.Close([4.0, 1.0], target.Output, 1e-9, "targetOutput");
        Assert.Contains(plan.Warnings, w => w.Code == WarningCode.SetpointOutsideInputLimits);
    }

    [Fact]
    public void TargetInsideTheLimitsIsTheUnconstrainedOne()
    {
        var free = TwoLagsOneOutput(1.0, new LimitsSpec());
        var limited = TwoLagsOneOutput(1.0, new LimitsSpec(InputMin: [-2.0, -2.0], InputMax: [2.0, 2.0]));
        var request = new PlanRequest([0.0, 0.0], [3.0]);
        var expected = free.Plan(request).Target!;
        var actual = limited.Plan(request).Target!;
        Assert.False(actual.LimitedByInputLimits);
        Assert.Equal(expected.Input, actual.Input);
        Assert.Equal(expected.State, actual.State);
    }

    [Fact]
    public void SetpointBeyondEveryLimitStopsAtTheCornerOfTheLimits()
    {
        // y = u1 + u2 ≤ 1 + 10 = 11 at best; r = 20 puts both inputs at their upper limits (closed form).
        var model = TwoLagsOneOutput(1.0, new LimitsSpec(InputMin: [-1.0, -10.0], InputMax: [1.0, 10.0]));
        var target = model.Plan(new PlanRequest([0.0, 0.0], [20.0])).Target!;
        Assert.False(target.ReferenceReached);
        Assertions.Close([1.0, 10.0], target.Input, 1e-12, "targetInput");
        Assertions.Close([2.0, 10.0], target.State, 1e-12, "targetState");
    }

    // Source: three-stage lexicographic target solved stage by stage with cvxopt.solvers.qp (CVXOPT 1.3.0), each stage
    // restricted to the previous stage's minimisers, cross-checked by enumerating every face of the input limits
    // with numpy.linalg (NumPy 1.24.2); tests/reference/generate_targets.py → fixtures/limited_targets.json.
    [Theory]
    [MemberData(nameof(Cases))]
    public void MatchesCvxoptLexicographicTargets(string name)
    {
        var c = Fixtures.Case("limited_targets.json", name);
        var model = ModelCompiler.Compile(Model(c));
        var plan = model.Plan(new PlanRequest(new double[model.StateCount], c.GetProperty("reference").Vector()));

        var target = plan.Target!;
        Assertions.Close(c.GetProperty("targetInput").Vector(), target.Input, 1e-6, name + ".targetInput");
        Assertions.Close(c.GetProperty("targetState").Vector(), target.State, 1e-6, name + ".targetState");
        Assert.Equal(c.GetProperty("targetReached").GetBoolean(), target.ReferenceReached);
        Assert.Equal(c.GetProperty("limited").GetBoolean(), target.LimitedByInputLimits);
    }

    // One model shared by many stations: limited targets computed at once on many threads equal the same targets
    // computed one by one. Four inputs for two outputs with tight limits, so most setpoints are out of reach and the
    // targets need cuts (pooled per request, never shared).
    [Fact]
    public void ParallelTargetsOnOneModelEqualSequentialTargets()
    {
        var random = new Random(17);
        var (a, b) = TestModels.Random(random, 5, 4, 0.8);
        double[][] c = [TestModels.RandomVector(random, 5), TestModels.RandomVector(random, 5)];
        var model = ModelCompiler.Compile(TestModels.Discrete(a, b, 3, [1.0, 2.0], TestModels.Ones(4), TerminalWeightSpec.Stage, c,
            limits: new LimitsSpec(InputMin: [-0.2, -0.1, -0.3, -0.2], InputMax: [0.2, 0.3, 0.1, 0.2])));
        var requests = Enumerable.Range(0, 300).Select(_ => new PlanRequest(new double[5], TestModels.RandomVector(random, 2, 3))).ToArray();
        var sequential = requests.Select(r => model.Plan(r).Target!).ToArray();
        var parallel = new SteadyStateTarget[requests.Length];
        Parallel.For(0, requests.Length, new ParallelOptions { MaxDegreeOfParallelism = 8 }, i => parallel[i] = model.Plan(requests[i]).Target!);
        for (int i = 0; i < requests.Length; i++)
        {
            Assert.Equal(sequential[i].State, parallel[i].State);
            Assert.Equal(sequential[i].Input, parallel[i].Input);
        }

        Assert.Contains(sequential, t => t.LimitedByInputLimits && !t.ReferenceReached);
        Assert.Contains(sequential, t => t.LimitedByInputLimits && t.ReferenceReached);
    }

    private static ModelDocument Model(JsonElement c)
    {
        int m = c.GetProperty("b")[0].GetArrayLength();
        return new ModelDocument(
            c.GetProperty("name").GetString(),
            new PlantSpec(c.GetProperty("a").Matrix(), c.GetProperty("b").Matrix(), c.GetProperty("c").Matrix(), 1.0),
            new CostSpec(3, WeightSpec.FromMatrix(c.GetProperty("q").Matrix()), WeightSpec.FromDiagonal(TestModels.Ones(m)), null, TerminalWeightSpec.Stage),
            new LimitsSpec(c.GetProperty("inputMin").NullableVector(), c.GetProperty("inputMax").NullableVector()));
    }
}
