using FsCheck.Xunit;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

/// <summary>
/// Properties of an unconstrained optimum that hold for any model (common practice for convex quadratics):
/// zero gradient, every perturbation raises the cost, zero state gives zero plan, linearity in x_0, and agreement of
/// the first move with an independent sparse solve. FsCheck draws the seed; each seed builds a random stable or
/// unstable plant. Every check says which model and which numbers failed.
/// </summary>
public class PlanPropertyTests
{
    /// <summary>A compiled random model together with the raw data it was built from, for independent references.</summary>
    private sealed record RandomCase(
        CompiledModel Model, Random Random, double[][] A, double[][] B, double[][] C, double[] Q, double[] R, double[]? S, double[][] Terminal)
    {
        public string Describe() =>
            $"n = {Model.StateCount}, m = {Model.InputCount}, p = {Model.OutputCount}, N = {Model.Horizon}, " +
            $"ρ(A) = {Model.Diagnostics.OpenLoopSpectralRadius:g4}, cond(H) = {Model.Diagnostics.HessianCondition:g3}" +
            (Model.Diagnostics.HessianCondition > CompiledModel.RefinementCondition ? " (refined plans)" : "");
    }

    private static RandomCase RandomModel(int seed)
    {
        var random = new Random(seed);
        int n = random.Next(1, 7);
        int m = random.Next(1, 4);
        int p = random.Next(1, n + 1);
        int horizon = random.Next(1, 25);
        double radius = 0.5 + random.NextDouble(); // 0.5 … 1.5: stable and unstable plants
        var (a, b) = TestModels.Random(random, n, m, radius);
        var c = Enumerable.Range(0, p).Select(_ => TestModels.RandomVector(random, n)).ToArray();
        double[] q = Enumerable.Range(0, p).Select(_ => 0.1 + random.NextDouble()).ToArray();
        double[] r = Enumerable.Range(0, m).Select(_ => 0.05 + random.NextDouble()).ToArray();
        double[]? s = random.Next(2) == 0 ? null : Enumerable.Range(0, m).Select(_ => random.NextDouble()).ToArray();
        bool stageTerminal = random.Next(2) == 0;
        var terminal = stageTerminal ? TerminalWeightSpec.Stage : new TerminalWeightSpec(TerminalWeightKind.Explicit, Identity(n));
        var model = ModelCompiler.Compile(TestModels.Discrete(a, b, horizon, q, r, terminal, c, s));
        return new RandomCase(model, random, a, b, c, q, r, s, stageTerminal ? OutputWeightOnStates(c, q) : Identity(n));
    }

    private static double[][] Identity(int n) => Enumerable.Range(0, n).Select(i => Enumerable.Range(0, n).Select(j => i == j ? 1.0 : 0.0).ToArray()).ToArray();

    /// <summary>CᵀQC for diagonal Q: the "stage" terminal weight, computed here rather than read from the model.</summary>
    private static double[][] OutputWeightOnStates(double[][] c, double[] q)
    {
        int n = c[0].Length;
        return Enumerable.Range(0, n).Select(i => Enumerable.Range(0, n).Select(j => Enumerable.Range(0, c.Length).Sum(k => c[k][i] * q[k] * c[k][j])).ToArray()).ToArray();
    }

    private static PlanRequest RandomRequest(CompiledModel model, Random random) => new(
        TestModels.RandomVector(random, model.StateCount, 3),
        random.Next(2) == 0 ? null : TestModels.RandomVector(random, model.OutputCount),
        random.Next(2) == 0 ? null : TestModels.RandomVector(random, model.InputCount));

    private static string Describe(PlanRequest request) =>
        $"x0 = [{Numbers(request.State)}], r = {(request.Reference is null ? "none" : $"[{Numbers(request.Reference)}]")}, " +
        $"u₋₁ = {(request.PreviousInput is null ? "none" : $"[{Numbers(request.PreviousInput)}]")}";

    private static string Numbers(IEnumerable<double> values) => string.Join(", ", values.Select(v => v.ToString("R", System.Globalization.CultureInfo.InvariantCulture)));

    [Property(MaxTest = 60)]
    public void GradientVanishesAtThePlan(int seed)
    {
        var c = RandomModel(seed);
        var (model, random) = (c.Model, c.Random);
        var request = RandomRequest(model, random);
        var plan = model.Plan(request);
        var gradient = new double[model.DecisionVariables];
        model.Trajectory.Gradient(plan.Inputs, plan.States, plan.Outputs, plan.Horizon, request.Reference, plan.Target?.State, plan.Target?.Input, request.PreviousInput, gradient);

        // Relative to the gradient of the zero plan (that is f in J = UᵀHU + 2fᵀU + c): ‖g(U*)‖∞ ≤ 1e-9·‖g(0)‖∞.
        var zero = new Plan(plan.Horizon, plan.StateCount, plan.InputCount, plan.OutputCount);
        model.Trajectory.Evaluate(zero, request.State, request.Reference, plan.Target?.State, plan.Target?.Input, request.PreviousInput);
        var atZero = new double[model.DecisionVariables];
        model.Trajectory.Gradient(zero.Inputs, zero.States, zero.Outputs, zero.Horizon, request.Reference, plan.Target?.State, plan.Target?.Input, request.PreviousInput, atZero);
        double scale = Math.Max(atZero.Select(Math.Abs).Max(), 1e-300);
        int worst = Enumerable.Range(0, gradient.Length).MaxBy(i => Math.Abs(gradient[i]));
        Assert.True(
            Math.Abs(gradient[worst]) <= 1e-9 * scale,
            $"{c.Describe()}; {Describe(request)}: gradient[{worst}] = {gradient[worst]:g3} at the plan, allowed {1e-9 * scale:g3} (1e-9 × ‖g(0)‖∞)");
    }

    [Property(MaxTest = 60)]
    public void EveryPerturbationRaisesTheCost(int seed)
    {
        var c = RandomModel(seed);
        var (model, random) = (c.Model, c.Random);
        var request = RandomRequest(model, random);
        var plan = model.Plan(request);
        for (int trial = 0; trial < 5; trial++)
        {
            var perturbed = new Plan(plan.Horizon, plan.StateCount, plan.InputCount, plan.OutputCount);
            plan.Inputs.CopyTo(perturbed.Inputs, 0);
            int index = random.Next(perturbed.Inputs.Length);
            double step = (random.NextDouble() - 0.5) * 1e-3;
            perturbed.Inputs[index] += step;
            double cost = model.Trajectory.Evaluate(perturbed, request.State, request.Reference, plan.Target?.State, plan.Target?.Input, request.PreviousInput);
            Assert.True(
                cost >= plan.Cost - (1e-12 * Math.Max(1, plan.Cost)),
                $"{c.Describe()}; {Describe(request)}: moving input {index} by {step:g3} lowered the cost from {plan.Cost:R} to {cost:R}");
        }
    }

    [Property(MaxTest = 40)]
    public void ZeroStateUnderRegulationGivesZeroPlan(int seed)
    {
        var c = RandomModel(seed);
        var plan = c.Model.Plan(new PlanRequest(new double[c.Model.StateCount]));
        int nonzero = Array.FindIndex(plan.Inputs, u => u != 0);
        Assert.True(nonzero < 0, $"{c.Describe()}: input {nonzero} is {(nonzero < 0 ? 0 : plan.Inputs[nonzero]):R} for x0 = 0");
        Assert.True(plan.Cost == 0, $"{c.Describe()}: cost {plan.Cost:R} for x0 = 0");
    }

    [Property(MaxTest = 40)]
    public void PlanIsLinearInTheState(int seed)
    {
        var c = RandomModel(seed);
        var (model, random) = (c.Model, c.Random);
        var x1 = TestModels.RandomVector(random, model.StateCount);
        var x2 = TestModels.RandomVector(random, model.StateCount);
        double alpha = random.NextDouble() * 4 - 2;
        var combined = x1.Zip(x2, (a, b) => (alpha * a) + b).ToArray();
        var u1 = model.Plan(new PlanRequest(x1)).Inputs;
        var u2 = model.Plan(new PlanRequest(x2)).Inputs;
        var u = model.Plan(new PlanRequest(combined)).Inputs;
        double scale = 1 + u1.Concat(u2).Select(Math.Abs).Max() * (1 + Math.Abs(alpha));
        for (int i = 0; i < u.Length; i++)
        {
            double expected = (alpha * u1[i]) + u2[i];
            Assert.True(
                Math.Abs(u[i] - expected) <= 1e-9 * scale,
                $"{c.Describe()}; α = {alpha:R}, x1 = [{Numbers(x1)}], x2 = [{Numbers(x2)}]: U(αx1 + x2)[{i}] = {u[i]:R}, αU(x1) + U(x2) = {expected:R}");
        }
    }

    // The first-move path (gain rows and the cost form, or the full plan when the model takes refinement) against a
    // sparse KKT solve built here from A, B, C, Q, R, S and P alone (Support/SparsePlanReference), so the check does not
    // compare a path with itself: for refined models FirstMove is the full plan, and the full plan is checked too.
    [Property(MaxTest = 60)]
    public void FirstMoveAgreesWithAnIndependentSparseSolve(int seed)
    {
        var c = RandomModel(seed);
        var request = RandomRequest(c.Model, c.Random);
        CheckFirstMoveAgainstSparseSolve(c, request);
    }

    // A strongly unstable plant over a long horizon: cond(H) ≈ 6e7 > 1e6, so FirstMove goes through the refined full
    // plan. The random models above stay far below that condition number; this case always takes the refined path.
    [Fact]
    public void FirstMoveOfARefinedModelAgreesWithAnIndependentSparseSolve()
    {
        double[][] a = [[1.35, 0.4, 0.0], [0.0, 1.2, 0.3], [0.1, 0.0, 0.9]];
        double[][] b = [[0.0], [0.0], [1.0]];
        double[][] output = [[1.0, 0.0, 0.0]];
        double[] q = [1.0], r = [0.01], s = [0.1];
        var model = ModelCompiler.Compile(TestModels.Discrete(a, b, 20, q, r, TerminalWeightSpec.Stage, output, s));
        var c = new RandomCase(model, new Random(7), a, b, output, q, r, s, OutputWeightOnStates(output, q));
        Assert.True(model.Diagnostics.HessianCondition > CompiledModel.RefinementCondition, $"{c.Describe()}: this model no longer takes the refined path");
        CheckFirstMoveAgainstSparseSolve(c, new PlanRequest([0.4, -1.0, 2.0], [0.7], [0.2]));
        CheckFirstMoveAgainstSparseSolve(c, new PlanRequest([1.0, 0.5, -0.3]));
    }

    private static void CheckFirstMoveAgainstSparseSolve(RandomCase c, PlanRequest request)
    {
        var model = c.Model;
        var reference = SparsePlanReference.Solve(c.A, c.B, c.C, c.Q, c.R, c.S, c.Terminal, model.Horizon, request.State, request.Reference, request.PreviousInput);
        var u0 = new double[model.InputCount];
        var quick = model.FirstMove(request, u0);
        var plan = model.Plan(request);
        string what = $"{c.Describe()}; {Describe(request)}";

        double scale = Math.Max(1, reference.Inputs.Select(Math.Abs).Max());
        Assert.True(quick.Status == PlanStatus.Optimal, $"{what}: first-move status {quick.Status}");
        for (int i = 0; i < u0.Length; i++)
        {
            Assert.True(
                Math.Abs(u0[i] - reference.Inputs[i]) <= 1e-9 * scale,
                $"{what}: first move u0[{i}] = {u0[i]:R}, sparse solve {reference.Inputs[i]:R} (allowed {1e-9 * scale:g3})");
        }

        double costScale = Math.Max(1, reference.Cost);
        Assert.True(
            Math.Abs(quick.Cost - reference.Cost) <= 1e-9 * costScale,
            $"{what}: first-move cost {quick.Cost:R}, sparse solve {reference.Cost:R}");
        for (int i = 0; i < plan.Inputs.Length; i++)
        {
            Assert.True(
                Math.Abs(plan.Inputs[i] - reference.Inputs[i]) <= 1e-9 * scale,
                $"{what}: plan input {i} = {plan.Inputs[i]:R}, sparse solve {reference.Inputs[i]:R} (allowed {1e-9 * scale:g3})");
        }

        Assert.True(Math.Abs(plan.Cost - reference.Cost) <= 1e-9 * costScale, $"{what}: plan cost {plan.Cost:R}, sparse solve {reference.Cost:R}");
    }
}
