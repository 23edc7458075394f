using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

/// <summary>
/// The limited steady-state target with a measured disturbance: over x = A x + B u + E v̄ with umin ≤ u ≤ umax,
/// least (C x − r)ᵀQ(C x − r), then least ‖u‖, then least ‖x‖ — against cvxopt.solvers.qp in three stages on the
/// sparse formulation, cross-checked there by the reduced formulation over u (CVXOPT 1.3.0;
/// fixtures/limited_disturbance_targets.json, tests/reference/generate_disturbance_targets.py).
/// </summary>
public class LimitedDisturbanceTargetTests
{
    private const string File = "limited_disturbance_targets.json";

    public static IEnumerable<object[]> Cases => Fixtures.CaseNames(File);

    [Theory]
    [MemberData(nameof(Cases))]
    public void MatchesCvxoptOverTheShiftedSteadyStates(string name)
    {
        var c = Fixtures.Case(File, name);
        var inputMin = c.GetProperty("inputMin").Vector().Select(v => (double?)v).ToArray();
        var inputMax = c.GetProperty("inputMax").Vector().Select(v => (double?)v).ToArray();
        int m = inputMin.Length;
        var document = new ModelDocument(
            name,
            new PlantSpec(c.GetProperty("a").Matrix(), c.GetProperty("b").Matrix(), c.GetProperty("c").Matrix(), 1.0, TimeDomain.Discrete, c.GetProperty("e").Matrix()),
            new CostSpec(5, WeightSpec.FromMatrix(c.GetProperty("q").Matrix()), WeightSpec.FromDiagonal(Enumerable.Repeat(0.1, m).ToArray())),
            new LimitsSpec(inputMin, inputMax));
        var model = ModelCompiler.Compile(document);
        var state = new double[document.Plant.A.Length];
        var plan = model.Plan(new PlanRequest(state, c.GetProperty("reference").Vector(), Disturbance: [c.GetProperty("disturbance").Vector()]));

        Assert.True(plan.Target!.LimitedByInputLimits, $"{name}: the limits were meant to move the target");
        Assertions.Close(c.GetProperty("targetInput").Vector(), plan.Target.Input, 1e-7, name + ".targetInput");
        Assertions.Close(c.GetProperty("targetState").Vector(), plan.Target.State, 1e-7, name + ".targetState");
        Assert.DoesNotContain(plan.Warnings, w => w.Code == WarningCode.DisturbanceTargetOutsideInputLimits);
    }
}
