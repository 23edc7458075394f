using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Numerics;
using Lookahead.Core.Validation;
using Xunit;

namespace Lookahead.Core.Tests.Validation;

/// <summary>
/// Finite numbers at the edges of the double range must end in a bad request that names the field, promptly:
/// never a hang, never an exception other than <see cref="ModelValidationException"/>.
/// </summary>
public class ExtremeScaleTests
{
    private static readonly double[][] Integrator = [[1.0, 0.1], [0.0, 1.0]];
    private static readonly double[][] IntegratorInput = [[0.005], [0.1]];
    private static readonly double[][] Tanks = [[-0.02, 0.01], [0.01, -0.03]];
    private static readonly double[][] TankInputs = [[0.05, 0.0], [0.0, 0.04]];

    private static ModelDocument Model(double[][] a, double[][] b, double sampleTime, TimeDomain domain, double[]? q = null, TerminalWeightSpec? terminal = null) =>
        new("extreme", new PlantSpec(a, b, null, sampleTime, domain), new CostSpec(10, WeightSpec.FromDiagonal(q ?? [1.0, 1.0]), WeightSpec.FromDiagonal(Enumerable.Repeat(1.0, b[0].Length).ToArray()), null, terminal));

    public static TheoryData<string, ModelDocument, string> Refused => new()
    {
        { "1e308 in A, discrete", Model([[1e308, 0.1], [0.0, 1.0]], IntegratorInput, 0.1, TimeDomain.Discrete), "plant.a" },
        { "1e308 in A, discrete, stage weight", Model([[1e308, 0.1], [0.0, 1.0]], IntegratorInput, 0.1, TimeDomain.Discrete, terminal: TerminalWeightSpec.Stage), "plant.a" },
        { "1e308 in A, continuous", Model([[1e308, 0.01], [0.01, -0.03]], TankInputs, 5, TimeDomain.Continuous), "plant.a" },
        { "1e308 in B, discrete", Model(Integrator, [[1e308], [0.1]], 0.1, TimeDomain.Discrete), "plant.b" },
        { "1e200 in B, discrete", Model(Integrator, [[1e200], [0.1]], 0.1, TimeDomain.Discrete), "plant.b" },
        { "1e308 in B, continuous", Model(Tanks, [[1e308, 0.0], [0.0, 0.04]], 5, TimeDomain.Continuous), "plant.b" },
        { "sample time 1e-300, continuous", Model(Tanks, TankInputs, 1e-300, TimeDomain.Continuous), "plant.sampleTime" },
        { "sample time 1e300, continuous", Model(Tanks, TankInputs, 1e300, TimeDomain.Continuous), "plant.sampleTime" },
        { "sample time 1e300, continuous, stage weight", Model(Tanks, TankInputs, 1e300, TimeDomain.Continuous, terminal: TerminalWeightSpec.Stage), "plant.sampleTime" },
        { "1e308 in Q", Model(Integrator, IntegratorInput, 0.1, TimeDomain.Discrete, [1e308, 1.0]), "cost.outputWeight" },
        { "1e308 in Q, stage weight", Model(Integrator, IntegratorInput, 0.1, TimeDomain.Discrete, [1e308, 1.0], TerminalWeightSpec.Stage), "cost.outputWeight" },
        { "1e200 in Q", Model(Integrator, IntegratorInput, 0.1, TimeDomain.Discrete, [1e200, 1e200]), "cost.outputWeight" },
        // e^{1·800} is beyond the double range: the hold itself overflows, and the sample time is the knob to turn.
        { "unstable continuous plant held too long", Model([[1.0, 0.0], [0.0, -1.0]], TankInputs, 800, TimeDomain.Continuous), "plant.sampleTime" },
    };

    [Theory]
    [MemberData(nameof(Refused))]
    public void IsABadRequestNamingTheField(string name, ModelDocument document, string field)
    {
        var ex = Assert.Throws<ModelValidationException>(() => Bounded.Run(() => ModelCompiler.Compile(document)));

        Assert.True(
            ex.Errors.Any(e => e.Path == field || e.Path.StartsWith(field + "[", StringComparison.Ordinal)),
            $"{name}: expected an error at {field}, got {string.Join("; ", ex.Errors.Select(e => $"{e.Path}: {e.Reason}"))}");
    }

    [Fact]
    public void AnEntryBeyondTheMagnitudeLimitIsNamedWithItsIndexAndTheLimit()
    {
        var errors = ModelValidator.Validate(Model([[1.0, 0.1], [1e308, 1.0]], IntegratorInput, 0.1, TimeDomain.Discrete));

        var error = Assert.Single(errors);
        Assert.Equal("plant.a[1][0]", error.Path);
        Assert.Contains(ModelValidator.MaxMagnitude.ToString("g3", System.Globalization.CultureInfo.CurrentCulture), error.Reason, StringComparison.Ordinal);
    }

    // A discrete plant's sample time is no numeric hazard in its plans, but stations count samples by it from 100 ns
    // timestamps: it must lie between one tick and the span of a timestamp, for every plant.
    [Theory]
    [InlineData(5e-324)]
    [InlineData(1e-300)]
    [InlineData(9e-8)]
    [InlineData(4e11)]
    [InlineData(1e300)]
    public void ADiscretePlantRefusesASampleTimeNoTimestampCanCount(double sampleTime)
    {
        var ex = Assert.Throws<ModelValidationException>(() => Bounded.Run(() => ModelCompiler.Compile(Model(Integrator, IntegratorInput, sampleTime, TimeDomain.Discrete))));
        Assert.Contains(ex.Errors, e => e.Path == "plant.sampleTime");
    }

    [Theory]
    [InlineData(1e-7)]
    [InlineData(1e-3)]
    [InlineData(3e11)]
    public void ADiscretePlantAcceptsSampleTimesFromOneTickToTheSpanOfATimestamp(double sampleTime) =>
        Assert.Equal(sampleTime, Bounded.Run(() => ModelCompiler.Compile(Model(Integrator, IntegratorInput, sampleTime, TimeDomain.Discrete))).SampleTime);

    // A stiff but stable plant sampled slowly: ‖A‖·T = 1e6 is far inside the hold's range, and the fast mode has died out.
    [Fact]
    public void AStiffStablePlantSampledSlowlyStillCompiles()
    {
        var model = Bounded.Run(() => ModelCompiler.Compile(Model([[-1e6, 0.0], [0.0, -1.0]], TankInputs, 1.0, TimeDomain.Continuous)));

        Assert.Equal(0.0, model.DiscreteA[0][0], 15);
        // Scaling by 2^18 for the fast mode costs the slow one some digits (rounding grows like 2^s·ε in the squarings).
        Support.Assertions.CloseScalar(Math.Exp(-1.0), model.DiscreteA[1][1], 1e-9);
    }

    // Weights scaled together by a large factor stay within range and give the same plan as unit weights.
    [Fact]
    public void LargeWeightsScaledTogetherStillCompile()
    {
        var unit = ModelCompiler.Compile(Model(Integrator, IntegratorInput, 0.1, TimeDomain.Discrete));
        var large = Bounded.Run(() => ModelCompiler.Compile(new ModelDocument(
            "large", new PlantSpec(Integrator, IntegratorInput, null, 0.1), new CostSpec(10, WeightSpec.FromDiagonal([1e30, 1e30]), WeightSpec.FromDiagonal([1e30])))));
        var request = new PlanRequest([1.0, 0.5]);

        Support.Assertions.Close(unit.Plan(request).Inputs, large.Plan(request).Inputs, 1e-8);
    }
}
