using System.Text.Json;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

/// <summary>
/// The interior-point path (Riccati Newton steps) against outside references, against the active-set path
/// (CompiledModel.Plan) and against the Karush–Kuhn–Tucker conditions.
/// </summary>
public class InteriorPointPlanTests
{
    public static IEnumerable<object[]> Cases => Fixtures.CaseNames("constrained_plans.json");

    // Source: cvxopt.solvers.qp (CVXOPT 1.3.0) on the sparse formulation — states and inputs as unknowns,
    // dynamics as equalities — with P from scipy.linalg.solve_discrete_are (SciPy 1.10.1); fixtures/constrained_plans.json.
    // ρ as in ConstrainedPlanTests: the case's linearViolationWeight when it has one, else the automatic weight.
    [Theory]
    [MemberData(nameof(Cases))]
    public void MatchesCvxoptOnTheSparseFormulation(string name)
    {
        var c = Fixtures.Case("constrained_plans.json", name);
        double? rho = c.TryGetProperty("linearViolationWeight", out var w) ? w[0].GetDouble() : null;
        var model = ModelCompiler.Compile(c.Model(), new CompileOptions { SoftLimitLinearWeight = rho });
        var problem = InteriorPointPlans.Build(model);
        var request = new PlanRequest(c.GetProperty("state").Vector(), c.OptionalVector("reference"), c.OptionalVector("previousInput"));
        var (plan, _) = InteriorPointPlans.Solve(model, problem, request, c.OptionalVector("targetState"), c.OptionalVector("targetInput"), rho);

        Assert.Equal(PlanStatus.Optimal, plan.Status);
        Assertions.Close(c.GetProperty("inputs").Matrix().Flatten(), plan.Inputs, 1e-6, name + ".inputs");
        Assertions.CloseScalar(c.GetProperty("cost").GetDouble(), plan.Cost, 1e-8, name + ".cost");
        var expectedSlack = c.GetProperty("slack").Vector().Where((_, j) => IsLimited(c, j)).ToArray();
        Assertions.Close(expectedSlack, ConstrainedPlanTests.Slacks(model, plan), 1e-6, name + ".slack");
        Kkt.CheckPlan(model, request, plan, rho, ConstrainedPlanTests.Slacks(model, plan));
    }

    // The plan a station gets today: the demo model with its automatic soft-limit weight (raised when that shrinks a
    // violation), cold and warm zones, with and without a previous input.
    [Fact]
    public void AgreesWithTheActiveSetOnTheDemoModel()
    {
        var model = ModelCompiler.Compile(DemoModel.Document);
        var problem = InteriorPointPlans.Build(model);
        var states = DemoModel.States(64, seed: 17);
        Assert.Contains(states, r => r.PreviousInput is not null && r.State.Max() > 2.5);
        foreach (var request in states)
        {
            var expected = InteriorPointPlans.ActiveSet(model, request);
            var (plan, _) = InteriorPointPlans.Solve(model, problem, request, null, null, null);
            string what = Describe(request);
            Assert.Equal(expected.Status, plan.Status);
            AssertSamePlan(model, request, expected, plan, what);
        }
    }

    // KKT by an independent check (Support/Kkt.cs: active rows found from the plan, multipliers by nonnegative
    // least squares) on the demo states, with ρ fixed so the weight the plan was solved with is known.
    [Fact]
    public void DemoPlansSatisfyKkt()
    {
        const double Rho = 1e5;
        var model = ModelCompiler.Compile(DemoModel.Document, new CompileOptions { SoftLimitLinearWeight = Rho });
        var problem = InteriorPointPlans.Build(model);
        foreach (var request in DemoModel.States(64, seed: 29))
        {
            var (plan, _) = InteriorPointPlans.Solve(model, problem, request, null, null, Rho);
            Assert.Equal(PlanStatus.Optimal, plan.Status);
            Kkt.CheckPlan(model, request, plan, Rho, ConstrainedPlanTests.Slacks(model, plan));
        }
    }

    // The active-set path raises ρ up to 10⁶ × the automatic weight; the interior-point path must solve there too,
    // where the slack bounds' multipliers are ~10¹⁰ and their barrier weights far larger.
    [Theory]
    [InlineData(1e3)]
    [InlineData(1e6)]
    public void SolvesWithRaisedSoftLimitWeights(double factor)
    {
        var reference = ModelCompiler.Compile(DemoModel.Document);
        double rho = factor * reference.ConstrainedWithPrevious!.SoftLimits.AutomaticLinearWeight;
        var model = ModelCompiler.Compile(DemoModel.Document, new CompileOptions { SoftLimitLinearWeight = rho });
        var problem = InteriorPointPlans.Build(model);
        foreach (var request in DemoModel.States(24, seed: 41))
        {
            var expected = InteriorPointPlans.ActiveSet(model, request);
            var (plan, _) = InteriorPointPlans.Solve(model, problem, request, null, null, rho);
            Assert.Equal(PlanStatus.Optimal, expected.Status);
            Assert.Equal(PlanStatus.Optimal, plan.Status);
            AssertSamePlan(model, request, expected, plan, Describe(request));
        }
    }

    // Random small models (dense C, dense or diagonal weights, any mix of missing limits, references and previous
    // inputs): wherever the active-set path finds the optimum, the interior-point path finds the same one.
    [Theory]
    [MemberData(nameof(Seeds))]
    public void AgreesWithTheActiveSetOnRandomModels(int seed)
    {
        var (document, request, rho) = RandomScenario(seed);
        var model = ModelCompiler.Compile(document, new CompileOptions { SoftLimitLinearWeight = rho });
        var problem = InteriorPointPlans.Build(model);
        var expected = InteriorPointPlans.ActiveSet(model, request);
        Assert.Equal(PlanStatus.Optimal, expected.Status);
        var (plan, _) = InteriorPointPlans.Solve(model, problem, request, expected.Target?.State, expected.Target?.Input, rho);
        Assert.Equal(PlanStatus.Optimal, plan.Status);
        AssertSamePlan(model, request, expected, plan, $"seed {seed}");
    }

    public static IEnumerable<object[]> Seeds => Enumerable.Range(1, 80).Select(s => new object[] { s });

    // As the active-set path does: an input that cannot reach its window within one rate step from u_{−1} drops
    // the first-move rate rows, keeps the input limits, and the plan is flagged naming that input.
    // The same plant with its inputs in other units (u' = f·u: B/f, R/f², S/f², input and rate limits ×f, u₋₁ ×f) is the
    // same problem (common practice: a change of units changes no optimum). The iteration runs on inputs scaled to
    // about their range by a power of two, so for f = 64 it takes exactly the same path (same iterations, inputs ×64
    // to rounding); for other factors the scaled ranges differ by up to √2 either way and the paths by a few
    // iterations, but their total stays within 15 % (before the scaling, percent took 15.2 iterations on average
    // where fractions took 12.8).
    [Theory]
    [InlineData(64.0, true)]
    [InlineData(1.0 / 8, true)]
    [InlineData(100.0, false)]
    [InlineData(1.0 / 1000, false)]
    public void InputUnitsDoNotChangeThePlanOrItsPath(double factor, bool powerOfTwo)
    {
        var model = ModelCompiler.Compile(DemoModel.Document);
        var rescaled = ModelCompiler.Compile(InInputUnits(DemoModel.Document, factor));
        var problem = InteriorPointPlans.Build(model);
        var rescaledProblem = InteriorPointPlans.Build(rescaled);
        int total = 0;
        int otherTotal = 0;
        foreach (var request in DemoModel.States(24, seed: 41))
        {
            var scaledRequest = request with { PreviousInput = request.PreviousInput?.Select(v => v * factor).ToArray() };
            // ρ fixed: the automatic one follows the condensed Hessian, which changes with the units.
            var (plan, outcome) = InteriorPointPlans.Solve(model, problem, request, null, null, 1e4);
            var (other, otherOutcome) = InteriorPointPlans.Solve(rescaled, rescaledProblem, scaledRequest, null, null, 1e4);
            string what = $"×{factor:g4}, {Describe(request)}";
            Assert.Equal(plan.Status, other.Status);
            Assert.True(!powerOfTwo || outcome.Iterations == otherOutcome.Iterations, $"{what}: {otherOutcome.Iterations} iterations against {outcome.Iterations}");
            total += outcome.Iterations;
            otherTotal += otherOutcome.Iterations;
            Assertions.Close(plan.Inputs.Select(v => v * factor).ToArray(), other.Inputs, 1e-7 * factor, what + ", inputs");
            Assertions.Close(plan.States, other.States, 1e-7, what + ", states");
        }

        Assert.True(Math.Abs(otherTotal - total) <= 0.15 * total, $"×{factor:g4}: {otherTotal} iterations over 24 plans against {total}");
    }

    private static ModelDocument InInputUnits(ModelDocument document, double factor)
    {
        static WeightSpec? Scale(WeightSpec? weight, double by) => weight is null ? null
            : weight.Diagonal is not null ? WeightSpec.FromDiagonal(weight.Diagonal.Select(v => v * by).ToArray())
            : WeightSpec.FromMatrix(weight.Matrix!.Select(row => row.Select(v => v * by).ToArray()).ToArray());
        static double?[]? Times(double?[]? values, double by) => values?.Select(v => v * by).ToArray();
        var limits = document.Limits!;
        return document with
        {
            Plant = document.Plant with { B = document.Plant.B.Select(row => row.Select(v => v / factor).ToArray()).ToArray() },
            Cost = document.Cost with { InputWeight = Scale(document.Cost.InputWeight, 1 / (factor * factor))!, InputRateWeight = Scale(document.Cost.InputRateWeight, 1 / (factor * factor)) },
            Limits = limits with { InputMin = Times(limits.InputMin, factor), InputMax = Times(limits.InputMax, factor), InputRateMin = Times(limits.InputRateMin, factor), InputRateMax = Times(limits.InputRateMax, factor) },
        };
    }

    [Fact]
    public void UnreachableFirstMoveRelaxesTheFirstRateLimitAndSaysSo()
    {
        var model = ModelCompiler.Compile(TestModels.Discrete([[1.0, 1.0], [0.0, 1.0]], [[0.5], [1.0]], 20, [1.0, 0.1], [0.1],
            limits: new LimitsSpec(InputMin: [-1.0], InputMax: [1.0], InputRateMin: [-0.2], InputRateMax: [0.2])));
        var problem = InteriorPointPlans.Build(model);
        var request = new PlanRequest([1.0, 0.0], PreviousInput: [1.8]);
        var inputs = new double[model.DecisionVariables];
        var result = problem.Solve(request.State, request.PreviousInput, default, default, default, default, inputs, []);
        Assert.True(result.FirstRateRowsDropped);
        Assert.Equal(InteriorPointStatus.Optimal, result.Status);

        var (plan, _) = InteriorPointPlans.Solve(model, problem, request, null, null, null);
        var expected = InteriorPointPlans.ActiveSet(model, request);
        Assert.Equal(PlanStatus.Infeasible, plan.Status);
        Assert.Contains(plan.Warnings, w => w.Code == WarningCode.FirstMoveRateRelaxed && w.Input == 0);
        Assert.All(plan.Inputs, u => Assert.InRange(u, -1.0, 1.0));
        Assertions.Close(expected.Inputs, plan.Inputs, 1e-6, "inputs");
    }

    // A solve that stops at its cap says so, and its inputs still respect their windows exactly.
    [Fact]
    public void IterationCapIsReportedAndInputsStayInTheirWindows()
    {
        var model = ModelCompiler.Compile(DemoModel.Document);
        var problem = new InteriorPointProblem(
            model.Model,
            MathNet.Numerics.LinearAlgebra.Matrix<double>.Build.DenseOfRowArrays(model.DiscreteA),
            MathNet.Numerics.LinearAlgebra.Matrix<double>.Build.DenseOfRowArrays(model.DiscreteB),
            MathNet.Numerics.LinearAlgebra.Matrix<double>.Build.DenseOfRowArrays(model.TerminalWeight),
            maxIterations: 2);
        var request = DemoModel.States(4, seed: 89)[3];
        var (plan, _) = InteriorPointPlans.Solve(model, problem, request, null, null, null);
        Assert.Equal(PlanStatus.IterationLimit, plan.Status);
        Assert.Contains(plan.Warnings, w => w.Code == WarningCode.IterationLimit && w.Count == 2);
        Assert.All(plan.Inputs, u => Assert.InRange(u, 0.0, 100.0));
    }

    // A reachable previous input keeps every rate row, the first one included.
    [Fact]
    public void ReachableFirstMoveKeepsTheFirstRateLimit()
    {
        var model = ModelCompiler.Compile(TestModels.Discrete([[1.0, 1.0], [0.0, 1.0]], [[0.5], [1.0]], 20, [1.0, 0.1], [0.1],
            limits: new LimitsSpec(InputMin: [-1.0], InputMax: [1.0], InputRateMin: [-0.2], InputRateMax: [0.2])));
        var problem = InteriorPointPlans.Build(model);
        var (plan, _) = InteriorPointPlans.Solve(model, problem, new PlanRequest([5.0, 0.0], PreviousInput: [0.9]), null, null, null);
        Assert.Equal(PlanStatus.Optimal, plan.Status);
        Assert.InRange(plan.Inputs[0] - 0.9, -0.2 - 1e-9, 0.2 + 1e-9);
        Assert.Contains(plan.ActiveLimits, l => l.Kind == LimitKind.InputRateMin && l.Step == 0);
    }

    // Every limit reported active holds with equality on the plan's inputs (complementarity read correctly).
    [Fact]
    public void ReportedActiveLimitsHoldWithEquality()
    {
        var model = ModelCompiler.Compile(DemoModel.Document);
        var problem = InteriorPointPlans.Build(model);
        var limits = model.Document.Limits!;
        foreach (var request in DemoModel.States(16, seed: 53))
        {
            var (plan, _) = InteriorPointPlans.Solve(model, problem, request, null, null, null);
            Assert.NotEmpty(plan.ActiveLimits);
            foreach (var limit in plan.ActiveLimits)
            {
                double Input(int k) => k < 0 ? request.PreviousInput![limit.Index] : plan.Inputs[(k * model.InputCount) + limit.Index];
                double gap = limit.Kind switch
                {
                    LimitKind.InputMin => Input(limit.Step) - limits.InputMin![limit.Index]!.Value,
                    LimitKind.InputMax => limits.InputMax![limit.Index]!.Value - Input(limit.Step),
                    LimitKind.InputRateMin => Input(limit.Step) - Input(limit.Step - 1) - limits.InputRateMin![limit.Index]!.Value,
                    LimitKind.InputRateMax => limits.InputRateMax![limit.Index]!.Value - (Input(limit.Step) - Input(limit.Step - 1)),
                    _ => OutputGap(plan, limit, limits, ConstrainedPlanTests.Slacks(model, plan)),
                };
                // 1e-10 of the demo's widest window (inputs 0…100 %), 1e-8 at least.
                Assert.True(Math.Abs(gap) <= 1e-8 * 100, $"{Describe(request)}: {limit} is reported active but is {gap:g3} from its limit");
            }
        }
    }

    // The bound that lets a raise of ρ be skipped must be a lower bound: no plan within the hard limits does better.
    [Fact]
    public void ForcedViolationNeverExceedsTheOptimalPlansViolation()
    {
        var model = ModelCompiler.Compile(DemoModel.Document);
        var problem = InteriorPointPlans.Build(model);
        int tight = 0;
        foreach (var request in DemoModel.States(64, seed: 61))
        {
            var plan = model.Plan(request);
            double bound = problem.ForcedViolation(request.State, request.PreviousInput, request.PreviousInput is not null);
            Assert.True(bound <= plan.MaxOutputViolation + 1e-9, $"{Describe(request)}: bound {bound:g6} above the optimal plan's violation {plan.MaxOutputViolation:g6}");
            tight += plan.MaxOutputViolation > 1e-9 && bound >= 0.99 * plan.MaxOutputViolation ? 1 : 0;
        }

        // Warm zones start above their limit; the first step's reachable window already forces most of it.
        Assert.True(tight > 0, "the bound never came within 1 % of a forced violation");
    }

    // One model shared by many stations: concurrent solves use their own pooled workspaces.
    [Fact]
    public void ParallelSolvesEqualSequentialSolves()
    {
        var model = ModelCompiler.Compile(DemoModel.Document);
        var problem = InteriorPointPlans.Build(model);
        var requests = DemoModel.States(48, seed: 71);
        var sequential = requests.Select(r => InteriorPointPlans.Solve(model, problem, r, null, null, null).Plan).ToArray();
        var parallel = new Plan[requests.Count];
        Parallel.For(0, requests.Count, new ParallelOptions { MaxDegreeOfParallelism = 8 }, i => parallel[i] = InteriorPointPlans.Solve(model, problem, requests[i], null, null, null).Plan);
        for (int i = 0; i < requests.Count; i++)
        {
            Assert.Equal(sequential[i].Inputs, parallel[i].Inputs);
            Assert.Equal(sequential[i].Cost, parallel[i].Cost);
        }
    }

    // After warm-up a solve allocates nothing: its buffers come from the model's pool.
    [Fact]
    public void SolveAllocatesNothingAfterWarmUp()
    {
        var model = ModelCompiler.Compile(DemoModel.Document);
        var problem = InteriorPointPlans.Build(model);
        var request = DemoModel.States(4, seed: 83)[3];
        var inputs = new double[model.DecisionVariables];
        var slacks = new double[problem.SlackCount];
        double[] rho = [1e5, 1e5, 1e5];
        for (int i = 0; i < 3; i++)
        {
            problem.Solve(request.State, request.PreviousInput, default, default, default, rho, inputs, slacks);
        }

        long before = GC.GetAllocatedBytesForCurrentThread();
        var result = problem.Solve(request.State, request.PreviousInput, default, default, default, rho, inputs, slacks);
        long allocated = GC.GetAllocatedBytesForCurrentThread() - before;
        Assert.Equal(InteriorPointStatus.Optimal, result.Status);
        Assert.Equal(0, allocated);
    }

    [Fact]
    public void WrongLengthsAreRefused()
    {
        var model = ModelCompiler.Compile(DemoModel.Document);
        var problem = InteriorPointPlans.Build(model);
        var inputs = new double[model.DecisionVariables];
        Assert.Throws<ArgumentException>(() => problem.Solve(new double[2], default, default, default, default, new double[3], inputs, new double[3]));
        Assert.Throws<ArgumentException>(() => problem.Solve(new double[3], default, default, default, default, new double[3], new double[5], new double[3]));
    }

    private static double OutputGap(Plan plan, ActiveLimit limit, LimitsSpec limits, double[] slacks)
    {
        int slot = 0;
        for (int j = 0; j < limit.Index; j++)
        {
            slot += limits.OutputMin?[j] is not null || limits.OutputMax?[j] is not null ? 1 : 0;
        }

        double y = plan.Outputs[(limit.Step * plan.OutputCount) + limit.Index];
        return limit.Kind == LimitKind.OutputMin
            ? y + slacks[slot] - limits.OutputMin![limit.Index]!.Value
            : limits.OutputMax![limit.Index]!.Value + slacks[slot] - y;
    }

    /// <summary>
    /// Inputs to 1e-6, J without the penalty to 1e-8 (relative) and the slacks read off the outputs to 1e-8 (the two
    /// methods reach a slack of order 1 by different arithmetic; with the managed dense kernels, seed 48 differs by
    /// 1.8e-9). The
    /// penalty itself is left out: it is ρε, and with ρ up to 10¹⁰ a slack rounded at 10⁻¹⁶ (or left at the
    /// active-set solver's feasibility tolerance, 10⁻¹²) moves it more than the plans differ.
    /// </summary>
    private static void AssertSamePlan(CompiledModel model, PlanRequest request, Plan expected, Plan actual, string what)
    {
        Assertions.Close(expected.Inputs, actual.Inputs, 1e-6, what + ".inputs");
        Assertions.CloseScalar(TrajectoryCost(model, request, expected), TrajectoryCost(model, request, actual), 1e-8, what + ".cost without penalty");
        Assertions.Close(ConstrainedPlanTests.Slacks(model, expected), ConstrainedPlanTests.Slacks(model, actual), 1e-8, what + ".slacks");
    }

    private static double TrajectoryCost(CompiledModel model, PlanRequest request, Plan plan) =>
        model.Trajectory.Cost(plan.Inputs, plan.States, plan.Outputs, plan.Horizon, request.Reference, plan.Target?.State, plan.Target?.Input, request.PreviousInput);

    private static string Describe(PlanRequest request) =>
        $"x0 [{string.Join(", ", request.State.Select(v => v.ToString("F3")))}]" + (request.PreviousInput is null ? "" : $", u_-1 [{string.Join(", ", request.PreviousInput.Select(v => v.ToString("F3")))}]");

    private static bool IsLimited(JsonElement c, int output)
    {
        var limits = c.GetProperty("limits");
        bool Has(string key) => limits.TryGetProperty(key, out var v) && v[output].ValueKind != JsonValueKind.Null;
        return Has("outputMin") || Has("outputMax");
    }

    private static (ModelDocument Document, PlanRequest Request, double? Rho) RandomScenario(int seed)
    {
        var random = new Random(seed);
        int n = random.Next(1, 6);
        int m = random.Next(1, 4);
        int p = random.Next(1, n + 1);
        int horizon = random.Next(1, 25);
        var (a, b) = TestModels.Random(random, n, m, 0.5 + random.NextDouble());
        var c = Enumerable.Range(0, p).Select(_ => TestModels.RandomVector(random, n)).ToArray();
        double[] q = Enumerable.Range(0, p).Select(_ => 0.1 + random.NextDouble()).ToArray();
        double?[] Bound(int size, double sign) => Enumerable.Range(0, size).Select(_ => random.Next(4) == 0 ? (double?)null : sign * (0.1 + random.NextDouble())).ToArray();
        WeightSpec Weight(int size, double floor)
        {
            if (random.Next(2) == 0)
            {
                return WeightSpec.FromDiagonal(Enumerable.Range(0, size).Select(_ => floor + random.NextDouble()).ToArray());
            }

            // Dense: LLᵀ + floor·I with L random.
            var l = Enumerable.Range(0, size).Select(_ => TestModels.RandomVector(random, size, 0.5)).ToArray();
            var w = new double[size][];
            for (int i = 0; i < size; i++)
            {
                w[i] = new double[size];
                for (int j = 0; j < size; j++)
                {
                    w[i][j] = Enumerable.Range(0, size).Sum(k => l[i][k] * l[j][k]) + (i == j ? floor : 0);
                }
            }

            return WeightSpec.FromMatrix(w);
        }

        bool rateWeight = random.Next(2) == 0;
        var limits = new LimitsSpec(
            Bound(m, -1), Bound(m, 1), Bound(m, -1), Bound(m, 1), Bound(p, -1), Bound(p, 1),
            Enumerable.Range(0, p).Select(_ => 0.1 + (random.NextDouble() * 10)).ToArray());
        var document = new ModelDocument(
            "random",
            new PlantSpec(a, b, c, 1.0),
            new CostSpec(horizon, WeightSpec.FromDiagonal(q), Weight(m, 0.05), rateWeight ? Weight(m, 0.0) : null, p == n && random.Next(2) == 0 ? null : TerminalWeightSpec.Stage),
            limits);
        var request = new PlanRequest(
            TestModels.RandomVector(random, n, 3),
            random.Next(3) == 0 ? TestModels.RandomVector(random, p, 0.3) : null,
            random.Next(2) == 0 ? null : Enumerable.Range(0, m).Select(_ => (random.NextDouble() - 0.5) * 0.3).ToArray());
        double? rho = random.Next(2) == 0 ? null : 1e4;
        return (document, request, rho);
    }

    [Fact]
    public void ColdPlansOfSmallModelsWithRateOrSoftLimitsGoThroughTheInteriorPointAndMatchTheActiveSet()
    {
        // The demo over 60 steps (1,083 limit rows): past the rows where the range-space active set plans cold instead.
        var longer = DemoModel.Document with { Cost = DemoModel.Document.Cost with { Horizon = 60 } };
        var demo = ModelCompiler.Compile(longer);
        var inputBoundsOnly = ModelCompiler.Compile(longer with { Limits = longer.Limits! with { InputRateMin = null, InputRateMax = null, OutputMin = null, OutputMax = null, OutputViolationWeight = null } });
        var demoItself = ModelCompiler.Compile(DemoModel.Document);
        Assert.True(demo.UsesInteriorPoint);
        Assert.False(inputBoundsOnly.UsesInteriorPoint);
        Assert.True(demoItself.ConstrainedWithPrevious!.RowCount <= ModelCompiler.RangeSpaceRowsUpTo);
        Assert.False(demoItself.UsesInteriorPoint);
        foreach (var request in DemoModel.States(40, seed: 73))
        {
            var routed = demo.Plan(request);
            var activeSet = InteriorPointPlans.ActiveSet(demo, request);
            Assert.Equal(activeSet.Status, routed.Status);
            Assertions.Close(activeSet.Inputs, routed.Inputs, 1e-6, Describe(request));
            Assertions.CloseScalar(activeSet.Cost, routed.Cost, 1e-8, Describe(request) + " cost");
        }
    }
}
