using Lookahead.Core.Models;
using Lookahead.Core.Numerics;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using MathNet.Numerics.LinearAlgebra;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

public class UnconstrainedPlanTests
{
    public static IEnumerable<object[]> Cases => Fixtures.CaseNames("unconstrained_plans.json");

    // Source: the sparse (non-condensed) KKT system with states as unknowns, solved by numpy.linalg (NumPy 1.24.2),
    // with P from scipy.linalg.solve_discrete_are (SciPy 1.10.1); fixtures/unconstrained_plans.json.
    [Theory]
    [MemberData(nameof(Cases))]
    public void MatchesSparseKktSolution(string name)
    {
        var c = Fixtures.Case("unconstrained_plans.json", name);
        var model = ModelCompiler.Compile(c.Model());
        Assertions.Close(c.GetProperty("terminalMatrix").Matrix(), model.TerminalWeight, 1e-8, name + ".terminal");
        var plan = model.Plan(new PlanRequest(c.GetProperty("state").Vector(), c.OptionalVector("reference"), c.OptionalVector("previousInput")));
        Assertions.Close(c.GetProperty("inputs").Matrix().Flatten(), plan.Inputs, 1e-9, name + ".inputs");
        Assertions.Close(c.GetProperty("states").Matrix().Flatten(), plan.States, 1e-9, name + ".states");
        Assertions.Close(c.GetProperty("outputs").Matrix().Flatten(), plan.Outputs, 1e-9, name + ".outputs");
        Assertions.CloseScalar(c.GetProperty("cost").GetDouble(), plan.Cost, 1e-9, name + ".cost");
        if (c.TryGetProperty("targetState", out var xs))
        {
            Assert.NotNull(plan.Target);
            Assertions.Close(xs.Vector(), plan.Target!.State, 1e-9, name + ".targetState");
            Assertions.Close(c.GetProperty("targetInput").Vector(), plan.Target.Input, 1e-9, name + ".targetInput");
            Assert.Equal(c.GetProperty("targetReached").GetBoolean(), plan.Target.ReferenceReached);
        }

        Assert.Equal(PlanStatus.Optimal, plan.Status);

        // The first-move path (no trajectory, cost as a quadratic form) must give the same u_0 and J.
        var request = new PlanRequest(c.GetProperty("state").Vector(), c.OptionalVector("reference"), c.OptionalVector("previousInput"));
        var firstMove = new double[model.InputCount];
        var quick = model.FirstMove(request, firstMove);
        Assertions.Close(c.GetProperty("inputs").Matrix()[0], firstMove, 1e-9, name + ".firstMove");
        Assertions.CloseScalar(c.GetProperty("cost").GetDouble(), quick.Cost, 1e-9, name + ".firstMoveCost");
    }

    // Common practice (Bellman's principle with the infinite-horizon cost-to-go as terminal weight):
    // with P the DARE solution and S = 0, the first move of every horizon's plan is −K x_0, K the LQR gain.
    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(7)]
    [InlineData(40)]
    public void RiccatiTerminalWeightGivesLqrFirstMoveForEveryHorizon(int horizon)
    {
        var random = new Random(11);
        var (a, b) = TestModels.Random(random, 5, 2, 1.3);
        var model = ModelCompiler.Compile(TestModels.Discrete(a, b, horizon, TestModels.Ones(5), [0.5, 2.0]));
        var riccati = DiscreteRiccati.Solve(DenseOf(a), DenseOf(b), Matrix<double>.Build.DenseIdentity(5), Matrix<double>.Build.DenseOfDiagonalArray([0.5, 2.0]));
        var x0 = TestModels.RandomVector(random, 5);
        var plan = model.Plan(new PlanRequest(x0));
        var expected = (riccati.Gain * Vector<double>.Build.DenseOfArray(x0)).Negate().ToArray();
        Assertions.Close(expected, plan.Input(0).ToArray(), 1e-9);
        Assertions.Close(riccati.Gain.ToRowArrays(), Matrix<double>.Build.DenseOfRowArrays(model.Gain.K), 1e-9);
    }

    // Common practice: dynamic programming (the backward Riccati recursion over the horizon) solves the same
    // problem as the condensed least squares, so every input must agree.
    [Theory]
    [InlineData(1, 3, 1, 0.8)]
    [InlineData(12, 4, 2, 1.2)]
    [InlineData(30, 6, 3, 0.95)]
    [InlineData(60, 3, 1, 1.05)]
    public void CondensedSolveEqualsBackwardRiccatiRecursion(int horizon, int n, int m, double radius)
    {
        var random = new Random(horizon * 100 + n);
        var (a, b) = TestModels.Random(random, n, m, radius);
        var c = Enumerable.Range(0, 2).Select(_ => TestModels.RandomVector(random, n)).ToArray();
        double[] q = [1.0, 3.0];
        double[] r = Enumerable.Range(0, m).Select(i => 0.1 + i).ToArray();
        var model = ModelCompiler.Compile(TestModels.Discrete(a, b, horizon, q, r, TerminalWeightSpec.Stage, c));
        var x0 = TestModels.RandomVector(random, n);
        var plan = model.Plan(new PlanRequest(x0));

        var am = DenseOf(a);
        var bm = DenseOf(b);
        var cm = DenseOf(c);
        var qx = cm.TransposeThisAndMultiply(Matrix<double>.Build.DenseOfDiagonalArray(q) * cm);
        var rm = Matrix<double>.Build.DenseOfDiagonalArray(r);
        var gains = new Matrix<double>[horizon];
        var p = qx; // terminal 'stage'
        for (int k = horizon - 1; k >= 0; k--)
        {
            gains[k] = (rm + bm.TransposeThisAndMultiply(p * bm)).Solve(bm.TransposeThisAndMultiply(p * am));
            p = qx + am.TransposeThisAndMultiply(p * (am - bm * gains[k]));
        }

        var x = Vector<double>.Build.DenseOfArray(x0);
        for (int k = 0; k < horizon; k++)
        {
            var u = -(gains[k] * x);
            Assertions.Close(u.ToArray(), plan.Input(k).ToArray(), 1e-9, $"u_{k}");
            x = am * x + bm * u;
        }

        // The DP value function at step 0 is x0ᵀP_0x0: it must equal J.
        Assertions.CloseScalar(Vector<double>.Build.DenseOfArray(x0) * (p * Vector<double>.Build.DenseOfArray(x0)), plan.Cost, 1e-9, "cost");
    }

    [Fact]
    public void PlanRejectsBadVectorsWithTheirPaths()
    {
        var model = ModelCompiler.Compile(TestModels.Discrete([[1.0]], [[1.0]], 3, [1.0], [1.0]));
        var ex = Assert.Throws<Lookahead.Core.Validation.ModelValidationException>(() => model.Plan(new PlanRequest([double.NaN], [1.0, 2.0], [])));
        Assert.Contains(ex.Errors, e => e.Path == "state[0]");
        Assert.Contains(ex.Errors, e => e.Path == "reference");
        Assert.Contains(ex.Errors, e => e.Path == "previousInput");
    }

    // Finite but enormous values overflow the prediction: a bad request with a reason, never NaN or ∞ in a plan.
    [Fact]
    public void PlanRefusesValuesThatOverflowThePrediction()
    {
        var model = ModelCompiler.Compile(TestModels.Discrete([[1.5, 0.1], [0.0, 1.2]], [[0.0], [1.0]], 20, [1.0, 1.0], [1.0], limits: new LimitsSpec(InputMin: [-1.0], InputMax: [1.0])));
        var ex = Assert.Throws<Lookahead.Core.Validation.ModelValidationException>(() => model.Plan(new PlanRequest([1e308, 1e308])));
        Assert.Equal("state", Assert.Single(ex.Errors).Path);
        var free = ModelCompiler.Compile(TestModels.Discrete([[1.5, 0.1], [0.0, 1.2]], [[0.0], [1.0]], 20, [1.0, 1.0], [1.0]));
        Assert.Throws<Lookahead.Core.Validation.ModelValidationException>(() => free.FirstMove(new PlanRequest([1e308, -1e308], [1e308, 1e308]), new double[1]));
    }

    [Fact]
    public void ContinuousPlantWhoseHoldOverflowsIsRefused()
    {
        var document = new ModelDocument("big", new PlantSpec([[1e200]], [[1.0]], null, 1.0, TimeDomain.Continuous), new CostSpec(3, WeightSpec.FromDiagonal([1.0]), WeightSpec.FromDiagonal([1.0]), null, TerminalWeightSpec.Stage));
        var ex = Assert.Throws<Lookahead.Core.Validation.ModelValidationException>(() => ModelCompiler.Compile(document));
        Assert.Equal("plant.a[0][0]", Assert.Single(ex.Errors).Path);
        var model = ModelCompiler.Compile(TestModels.Discrete([[0.5]], [[1.0]], 3, [1.0], [1.0]));
        var simulation = Assert.Throws<Lookahead.Core.Validation.ModelValidationException>(() => ClosedLoopSimulator.Simulate(model, new SimulationRequest([1.0], 3, TruePlant: new PlantSpec([[1e308]], [[1.0]], null, 1.0, TimeDomain.Continuous))));
        Assert.Contains(simulation.Errors, e => e.Path == "truePlant");
    }

    internal static Matrix<double> DenseOf(double[][] rows) => Matrix<double>.Build.DenseOfRowArrays(rows);
}
