using FsCheck.Xunit;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;

namespace Lookahead.Core.Tests.Planning;

/// <summary>
/// Properties of an unconstrained optimum that hold for any model (common practice for convex quadratics):
/// zero gradient, every perturbation raises the cost, zero state gives zero plan, linearity in x_0.
/// FsCheck draws the seed; each seed builds a random stable or unstable plant.
/// </summary>
public class PlanPropertyTests
{
    private static (CompiledModel Model, Random Random) RandomModel(int seed)
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
        var terminal = random.Next(2) == 0 ? TerminalWeightSpec.Stage : new TerminalWeightSpec(TerminalWeightKind.Explicit, Identity(n));
        return (ModelCompiler.Compile(TestModels.Discrete(a, b, horizon, q, r, terminal, c, s)), random);
    }

    private static double[][] Identity(int n) => Enumerable.Range(0, n).Select(i => Enumerable.Range(0, n).Select(j => i == j ? 1.0 : 0.0).ToArray()).ToArray();

    private static PlanRequest RandomRequest(CompiledModel model, Random random) => new(
        TestModels.RandomVector(random, model.StateCount, 3),
        random.Next(2) == 0 ? null : TestModels.RandomVector(random, model.OutputCount),
        random.Next(2) == 0 ? null : TestModels.RandomVector(random, model.InputCount));

    [Property(MaxTest = 60)]
    public bool GradientVanishesAtThePlan(int seed)
    {
        var (model, random) = RandomModel(seed);
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
        return gradient.All(g => Math.Abs(g) <= 1e-9 * scale);
    }

    [Property(MaxTest = 60)]
    public bool EveryPerturbationRaisesTheCost(int seed)
    {
        var (model, random) = RandomModel(seed);
        var request = RandomRequest(model, random);
        var plan = model.Plan(request);
        for (int trial = 0; trial < 5; trial++)
        {
            var perturbed = new Plan(plan.Horizon, plan.StateCount, plan.InputCount, plan.OutputCount);
            plan.Inputs.CopyTo(perturbed.Inputs, 0);
            int index = random.Next(perturbed.Inputs.Length);
            perturbed.Inputs[index] += (random.NextDouble() - 0.5) * 1e-3;
            double cost = model.Trajectory.Evaluate(perturbed, request.State, request.Reference, plan.Target?.State, plan.Target?.Input, request.PreviousInput);
            if (!(cost >= plan.Cost - (1e-12 * Math.Max(1, plan.Cost))))
            {
                return false;
            }
        }

        return true;
    }

    [Property(MaxTest = 40)]
    public bool ZeroStateUnderRegulationGivesZeroPlan(int seed)
    {
        var (model, _) = RandomModel(seed);
        var plan = model.Plan(new PlanRequest(new double[model.StateCount]));
        return plan.Inputs.All(u => u == 0) && plan.Cost == 0;
    }

    [Property(MaxTest = 40)]
    public bool PlanIsLinearInTheState(int seed)
    {
        var (model, random) = RandomModel(seed);
        var x1 = TestModels.RandomVector(random, model.StateCount);
        var x2 = TestModels.RandomVector(random, model.StateCount);
        double alpha = random.NextDouble() * 4 - 2;
        var combined = x1.Zip(x2, (a, b) => (alpha * a) + b).ToArray();
        var u1 = model.Plan(new PlanRequest(x1)).Inputs;
        var u2 = model.Plan(new PlanRequest(x2)).Inputs;
        var u = model.Plan(new PlanRequest(combined)).Inputs;
        double scale = 1 + u1.Concat(u2).Select(Math.Abs).Max() * (1 + Math.Abs(alpha));
        return u.Select((v, i) => Math.Abs(v - ((alpha * u1[i]) + u2[i]))).All(e => e <= 1e-9 * scale);
    }

    [Property(MaxTest = 60)]
    public bool FirstMovePathAgreesWithTheFullPlan(int seed)
    {
        var (model, random) = RandomModel(seed);
        var request = RandomRequest(model, random);
        var plan = model.Plan(request);
        var u0 = new double[model.InputCount];
        var quick = model.FirstMove(request, u0);
        double scale = Math.Max(1, plan.Inputs.Select(Math.Abs).Max());
        return quick.Status == plan.Status
            && u0.Select((v, i) => Math.Abs(v - plan.Inputs[i])).All(e => e <= 1e-9 * scale)
            && Math.Abs(quick.Cost - plan.Cost) <= 1e-9 * Math.Max(1, plan.Cost);
    }
}
