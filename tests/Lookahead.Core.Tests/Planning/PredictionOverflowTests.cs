using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Lookahead.Core.Validation;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

/// <summary>
/// Finite values that overflow the prediction are refused naming the field to blame: the request vector whose size
/// causes it, or the plant when the request is modest and the plant's own growth overflows.
/// </summary>
public class PredictionOverflowTests
{
    // Double integrator tracking its position, with a rate weight so the previous input enters the cost.
    private static CompiledModel DoubleIntegrator(LimitsSpec? limits = null) =>
        ModelCompiler.Compile(TestModels.Discrete([[1.0, 1.0], [0.0, 1.0]], [[0.5], [1.0]], 20, [1.0], [0.1], TerminalWeightSpec.Stage, c: [[1.0, 0.0]], s: [1.0], limits: limits));

    private static string RefusedField(Action plan)
    {
        var refusal = Assert.Throws<ModelValidationException>(plan);
        return Assert.Single(refusal.Errors).Path;
    }

    public static TheoryData<double[], double[]?, double[]?, string> OversizedFields => new()
    {
        { [1e200, 0.0], null, null, "state" },
        { [1e200, 0.0], null, [5.0], "state" },
        { [1.0, 2.0], [1e200], null, "reference" },
        { [1.0, 2.0], [-1e308], [5.0], "reference" },
        { [1.0, 2.0], null, [1e200], "previousInput" },
        { [1.0, 2.0], [3.0], [-1e250], "previousInput" },
    };

    [Theory]
    [MemberData(nameof(OversizedFields))]
    public void FullPlanNamesTheOversizedField(double[] state, double[]? reference, double[]? previousInput, string field)
    {
        var model = DoubleIntegrator();
        Assert.Equal(field, RefusedField(() => model.Plan(new PlanRequest(state, reference, previousInput))));
    }

    [Theory]
    [MemberData(nameof(OversizedFields))]
    public void FirstMoveNamesTheOversizedField(double[] state, double[]? reference, double[]? previousInput, string field)
    {
        var model = DoubleIntegrator();
        var move = new double[model.InputCount];
        Assert.Equal(field, RefusedField(() => model.FirstMove(new PlanRequest(state, reference, previousInput), move)));
    }

    // Two zones with input and rate limits plan on the range-space active set: a state near the largest double turns
    // its step lengths into NaN, which must end the solve (no row to drop) and come back as the state's refusal.
    [Theory]
    [InlineData(1e308)]
    [InlineData(-1e308)]
    [InlineData(1e300)]
    public void RangeSpaceLimitedPlanNamesAnOverflowingState(double size)
    {
        var model = ModelCompiler.Compile(TestModels.Discrete(
            [[0.9, 0.05], [0.04, 0.85]], [[0.1, 0.0], [0.02, 0.08]], 15, [1.0, 1.0], [0.05, 0.05], s: [0.1, 0.1],
            limits: new LimitsSpec([0.0, 0.0], [100.0, 100.0], [-5.0, -5.0], [5.0, 5.0])));
        Assert.True(model.ConstrainedWithPrevious!.Solver.UsesRangeSpace);
        Assert.Equal("state", RefusedField(() => model.Plan(new PlanRequest([size, 0.0], [-1.0, 0.5], [40.0, 40.0]))));
    }

    [Theory]
    [MemberData(nameof(OversizedFields))]
    public void LimitedPlanNamesTheOversizedField(double[] state, double[]? reference, double[]? previousInput, string field)
    {
        // Soft output limits put the state into the right-hand sides and rate limits the previous input.
        var model = DoubleIntegrator(new LimitsSpec(InputRateMin: [-0.5], InputRateMax: [0.5], OutputMin: [-10.0], OutputMax: [10.0], OutputViolationWeight: [1.0]));
        Assert.Equal(field, RefusedField(() => model.Plan(new PlanRequest(state, reference, previousInput))));
    }

    [Theory]
    [InlineData(false)]
    [InlineData(true)]
    public void ModestRequestOnAPlantThatOverflowsNamesThePlant(bool firstMoveOnly)
    {
        // A mode growing ×1e9 per step that no input moves: compiling stays finite (its weight reaches 1e288 over the
        // horizon of 16), yet from x_0 = [1e12, 0] the cost passes 1e308 — a size the plant, not the value, makes
        // too large (a unit state already costs 1e288).
        var model = ModelCompiler.Compile(TestModels.Discrete([[1e9, 0.0], [0.0, 0.5]], [[0.0], [1.0]], 16, [1.0, 1.0], [1.0], TerminalWeightSpec.Stage));
        var request = new PlanRequest([1e12, 0.0], [0.0, 0.5], [0.1]);
        var move = new double[model.InputCount];
        Assert.Equal("plant", RefusedField(() =>
        {
            if (firstMoveOnly)
            {
                model.FirstMove(request, move);
            }
            else
            {
                model.Plan(request);
            }
        }));
    }

    [Fact]
    public void ModestRequestWellInsideRangeIsNotRefused()
    {
        var model = DoubleIntegrator();
        var plan = model.Plan(new PlanRequest([1e100, 0.0]));
        Assert.True(double.IsFinite(plan.Cost));
    }
}
