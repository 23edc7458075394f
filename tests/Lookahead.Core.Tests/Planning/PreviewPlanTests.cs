using System.Text.Json;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Lookahead.Core.Validation;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

/// <summary>
/// Plans with measured disturbances, disturbance forecasts and reference schedules against an independent sparse QP
/// with time-varying r_k and v_k: cvxopt.solvers.qp (CVXOPT 1.3.0) with P from scipy.linalg.solve_discrete_are and
/// continuous plants held by scipy.signal.cont2discrete on [B E] (SciPy 1.10.1), targets by nested least squares
/// (fixtures/preview_plans.json, tests/reference/generate_previews.py).
/// </summary>
public class PreviewPlanTests
{
    private const string File = "preview_plans.json";

    public static IEnumerable<object[]> Cases => Fixtures.CaseNames(File);

    public static IEnumerable<object[]> Refused =>
        Fixtures.Load(File).GetProperty("refused").EnumerateArray().Select(r => new object[] { r.GetProperty("name").GetString()! });

    public static IEnumerable<object[]> CasesBothWays =>
        Fixtures.CaseNames(File).SelectMany(c => new[] { new object[] { c[0], true }, new object[] { c[0], false } });

    // Both ways of answering a preview: the cached stacked-preview maps, and the Newton step used where they do not fit.
    [Theory]
    [MemberData(nameof(CasesBothWays))]
    public void MatchesCvxoptWithTimeVaryingReferencesAndDisturbances(string name, bool maps)
    {
        var c = Fixtures.Case(File, name);
        double? rho = c.TryGetProperty("linearViolationWeight", out var w) ? w[0].GetDouble() : null;
        var model = ModelCompiler.Compile(c.Model(), new CompileOptions { SoftLimitLinearWeight = rho, CachePreviewMaps = maps });
        Assert.Equal(maps, model.PreviewFor(false) is not null);
        var request = Request(c);
        var plan = model.Plan(request);

        Assert.Equal(PlanStatus.Optimal, plan.Status);
        Assertions.Close(c.GetProperty("inputs").Matrix().Flatten(), plan.Inputs, 1e-6, name + ".inputs");
        Assertions.Close(c.GetProperty("states").Matrix().Flatten(), plan.States, 1e-6, name + ".states");
        Assertions.CloseScalar(c.GetProperty("cost").GetDouble(), plan.Cost, 1e-8, name + ".cost");
        var target = c.GetProperty("target");
        Assertions.Close(target.GetProperty("state").Vector(), plan.Target!.State, 1e-8, name + ".targetState");
        Assertions.Close(target.GetProperty("input").Vector(), plan.Target.Input, 1e-8, name + ".targetInput");
        Assert.Equal(target.GetProperty("referenceReached").GetBoolean(), plan.Target.ReferenceReached);
        if (c.TryGetProperty("discretePlant", out var discrete))
        {
            Assertions.Close(discrete.GetProperty("e").Matrix(), model.DiscreteE, 1e-12, name + ".E_d");
        }
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void AWarmStartedPlanAndTheFirstMoveAgreeWithTheColdPlan(string name)
    {
        var c = Fixtures.Case(File, name);
        double? rho = c.TryGetProperty("linearViolationWeight", out var w) ? w[0].GetDouble() : null;
        var model = ModelCompiler.Compile(c.Model(), new CompileOptions { SoftLimitLinearWeight = rho });
        var request = Request(c);
        var cold = model.Plan(request);
        var warm = model.CreateWarmStart();
        model.Plan(request with { State = request.State.Select(v => -v).ToArray() }, warm);
        var warmPlan = model.Plan(request, warm);
        Assertions.Close(cold.Inputs, warmPlan.Inputs, 1e-9, name + ".warm");
        var first = new double[model.InputCount];
        model.FirstMove(request, first);
        Assertions.Close(cold.Input(0).ToArray(), first, 1e-12, name + ".firstMove");
    }

    [Theory]
    [MemberData(nameof(Refused))]
    public void ABadScheduleOrForecastIsRefusedByPath(string name)
    {
        var refused = Fixtures.Load(File).GetProperty("refused").EnumerateArray().Single(r => r.GetProperty("name").GetString() == name);
        var c = Fixtures.Case(File, refused.GetProperty("modelCase").GetString()!);
        var model = ModelCompiler.Compile(c.Model());
        var request = Request(refused.GetProperty("request"));
        string path = refused.GetProperty("path").GetString()!;
        Assert.Contains(model.ValidateRequest(request), e => e.Path == path);
        var thrown = Assert.Throws<ModelValidationException>(() => model.Plan(request));
        Assert.Contains(thrown.Errors, e => e.Path == path);
    }

    [Fact]
    public void AHeldScheduleAndAZeroDisturbanceGiveThePlainPlan()
    {
        // Common practice: a schedule whose rows are all r is the setpoint r; a zero forecast is no disturbance.
        var c = Fixtures.Case(File, "disturbance-forecast-only-N12");
        var model = ModelCompiler.Compile(c.Model());
        var state = c.GetProperty("state").Vector();
        var reference = new double[model.OutputCount];
        reference[0] = 0.3;
        var plain = model.Plan(new PlanRequest(state, reference));
        var schedule = model.Plan(new PlanRequest(state, ReferenceSchedule: [reference, reference], Disturbance: [new double[model.DisturbanceCount]]));
        Assertions.Close(plain.Inputs, schedule.Inputs, 1e-9, "inputs");
        Assertions.CloseScalar(plain.Cost, schedule.Cost, 1e-9, "cost");
    }

    private static PlanRequest Request(JsonElement c)
    {
        double[]? reference = null;
        double[][]? schedule = null;
        if (c.TryGetProperty("reference", out var r))
        {
            if (r[0].ValueKind == JsonValueKind.Array)
            {
                schedule = r.Matrix();
            }
            else
            {
                reference = r.Vector();
            }
        }

        double[][]? disturbance = null;
        if (c.TryGetProperty("disturbance", out var v))
        {
            disturbance = v[0].ValueKind == JsonValueKind.Array ? v.Matrix() : [v.Vector()];
        }

        return new PlanRequest(c.GetProperty("state").Vector(), reference, c.OptionalVector("previousInput"), schedule, disturbance);
    }
}
