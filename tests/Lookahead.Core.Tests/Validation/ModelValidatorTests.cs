using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Lookahead.Core.Validation;
using Xunit;

namespace Lookahead.Core.Tests.Validation;

public class ModelValidatorTests
{
    private static ModelDocument Valid() => TestModels.Discrete([[1.0, 0.1], [0.0, 1.0]], [[0.0], [0.1]], 10, [1.0, 1.0], [0.1]);

    private static void AssertRefused(ModelDocument document, string path, string? reasonFragment = null, SizeLimits? limits = null)
    {
        var errors = ModelValidator.Validate(document, limits);
        Assert.Contains(errors, e => e.Path == path && (reasonFragment is null || e.Reason.Contains(reasonFragment, StringComparison.Ordinal)));
        var ex = Assert.Throws<ModelValidationException>(() => ModelCompiler.Compile(document, new CompileOptions { SizeLimits = limits ?? SizeLimits.Default }));
        Assert.Contains(ex.Errors, e => e.Path == path);
    }

    [Fact]
    public void AcceptsAValidModel() => Assert.Empty(ModelValidator.Validate(Valid()));

    [Fact]
    public void RefusesNonSquareA() => AssertRefused(Valid() with { Plant = Valid().Plant with { A = [[1.0, 0.1]] } }, "plant.a[0]", "expected 1");

    [Fact]
    public void RefusesRaggedA() => AssertRefused(Valid() with { Plant = Valid().Plant with { A = [[1.0, 0.1], [0.0]] } }, "plant.a[1]");

    [Fact]
    public void RefusesBWithWrongRowCount() => AssertRefused(Valid() with { Plant = Valid().Plant with { B = [[0.0]] } }, "plant.b", "rows");

    [Fact]
    public void RefusesCWithWrongColumnCount() => AssertRefused(Valid() with { Plant = Valid().Plant with { C = [[1.0, 0.0, 0.0]] } }, "plant.c[0]");

    [Theory]
    [InlineData(double.NaN)]
    [InlineData(double.PositiveInfinity)]
    public void RefusesNonFiniteEntries(double bad) =>
        AssertRefused(Valid() with { Plant = Valid().Plant with { A = [[1.0, bad], [0.0, 1.0]] } }, "plant.a[0][1]", "finite");

    [Theory]
    [InlineData(0.0)]
    [InlineData(-1.0)]
    public void RefusesNonPositiveSampleTime(double t) => AssertRefused(Valid() with { Plant = Valid().Plant with { SampleTime = t } }, "plant.sampleTime");

    [Fact]
    public void RefusesZeroHorizon() => AssertRefused(Valid() with { Cost = Valid().Cost with { Horizon = 0 } }, "cost.horizon");

    [Fact]
    public void RefusesInputWeightOfWrongSize() => AssertRefused(Valid() with { Cost = Valid().Cost with { InputWeight = WeightSpec.FromDiagonal([1.0, 2.0]) } }, "cost.inputWeight");

    [Fact]
    public void RefusesAsymmetricWeight() =>
        AssertRefused(Valid() with { Cost = Valid().Cost with { OutputWeight = WeightSpec.FromMatrix([[1.0, 0.5], [0.4, 1.0]]) } }, "cost.outputWeight[0][1]", "symmetric");

    [Fact]
    public void RefusesInputWeightThatIsOnlySemidefinite() =>
        AssertRefused(Valid() with { Cost = Valid().Cost with { InputWeight = WeightSpec.FromDiagonal([0.0]) } }, "cost.inputWeight", "positive definite");

    [Fact]
    public void RefusesIndefiniteOutputWeight() =>
        AssertRefused(Valid() with { Cost = Valid().Cost with { OutputWeight = WeightSpec.FromMatrix([[1.0, 2.0], [2.0, 1.0]]) } }, "cost.outputWeight", "semidefinite");

    [Fact]
    public void RefusesIndefiniteTerminalWeight() =>
        AssertRefused(Valid() with { Cost = Valid().Cost with { TerminalWeight = new TerminalWeightSpec(TerminalWeightKind.Explicit, [[1.0, 0.0], [0.0, -1.0]]) } }, "cost.terminalWeight");

    [Fact]
    public void RefusesStatesAboveTheLimitBeforeAllocating()
    {
        var limits = new SizeLimits { MaxStates = 3 };
        var big = Enumerable.Range(0, 4).Select(_ => new double[4]).ToArray();
        AssertRefused(Valid() with { Plant = Valid().Plant with { A = big, B = Enumerable.Range(0, 4).Select(_ => new double[1]).ToArray(), C = null } }, "plant.a", "at most 3", limits);
    }

    [Fact]
    public void RefusesTooManyDecisionVariables() =>
        AssertRefused(Valid() with { Cost = Valid().Cost with { Horizon = 300 } }, "cost.horizon", "decision variables", new SizeLimits { MaxDecisionVariables = 200 });

    [Fact]
    public void RefusesLimitsInTheWrongOrder() =>
        AssertRefused(Valid() with { Limits = new LimitsSpec(InputMin: [1.0], InputMax: [0.0]) }, "limits.inputMin[0]");

    [Fact]
    public void RefusesLimitsOfTheWrongLength() =>
        AssertRefused(Valid() with { Limits = new LimitsSpec(OutputMax: [1.0], OutputViolationWeight: [1.0]) }, "limits.outputMax");

    [Fact]
    public void RefusesOutputLimitsWithoutViolationWeight() =>
        AssertRefused(Valid() with { Limits = new LimitsSpec(OutputMax: [1.0, null]) }, "limits.outputViolationWeight");

    [Fact]
    public void RefusesNonPositiveViolationWeight() =>
        AssertRefused(Valid() with { Limits = new LimitsSpec(OutputMax: [null, 1.0], OutputViolationWeight: [1.0, 0.0]) }, "limits.outputViolationWeight[1]");

    [Fact]
    public void RefusesRateLimitsThatForbidHoldingTheInput() =>
        AssertRefused(Valid() with { Limits = new LimitsSpec(InputRateMin: [0.1], InputRateMax: [0.5]) }, "limits.inputRateMin[0]");

    // Control characters (C0, DEL, C1) would break the CSV headers, charts and log lines names and labels are written into.
    [Theory]
    [InlineData("\u0000")]
    [InlineData("\t")]
    [InlineData("\u001b")]
    [InlineData("\u007f")]
    [InlineData("\u009b")]
    public void RefusesControlCharactersInTheNameLabelsAndUnits(string control)
    {
        AssertRefused(Valid() with { Name = "tank" + control }, "name", "control characters");
        AssertRefused(Valid() with { Labels = new LabelsSpec(States: ["level", control + "rate"]) }, "labels.states[1]", "control characters");
        AssertRefused(Valid() with { Labels = new LabelsSpec(Units: new UnitsSpec(Outputs: ["m", "m/s" + control])) }, "labels.units.outputs[1]", "control characters");
    }

    [Fact]
    public void AcceptsPrintableUnicodeInNamesAndUnits() =>
        Assert.Empty(ModelValidator.Validate(Valid() with { Name = "Kühlhaus – Zone A", Labels = new LabelsSpec(States: ["höhe", "Δh"], Units: new UnitsSpec(States: ["m³", "°C"])) }));

    [Fact]
    public void RefusesDuplicateLabels() =>
        AssertRefused(Valid() with { Labels = new LabelsSpec(States: ["zone", "zone"]) }, "labels.states[1]");

    [Fact]
    public void ReportsEveryProblemAtOnce()
    {
        var document = Valid() with
        {
            Plant = Valid().Plant with { SampleTime = -1 },
            Cost = Valid().Cost with { Horizon = 0, InputWeight = WeightSpec.FromDiagonal([1.0, 1.0]) },
        };
        var paths = ModelValidator.Validate(document).Select(e => e.Path).ToHashSet();
        Assert.Superset(new HashSet<string> { "plant.sampleTime", "cost.horizon", "cost.inputWeight" }, paths);
    }

    // The Riccati weight is refused with a reason when (A, B) is not stabilisable (an unstable mode no input reaches).
    [Fact]
    public void RefusesRiccatiTerminalWeightForUnstabilisablePlant()
    {
        var document = TestModels.Discrete([[1.5, 0.0], [0.0, 0.5]], [[0.0], [1.0]], 5, [1.0, 1.0], [1.0]);
        var ex = Assert.Throws<ModelValidationException>(() => ModelCompiler.Compile(document));
        var error = Assert.Single(ex.Errors);
        Assert.Equal("cost.terminalWeight", error.Path);
        Assert.Contains("not stabilisable", error.Reason);
        // The same plant with the stage weight compiles, and the diagnostics say what is wrong.
        var model = ModelCompiler.Compile(document with { Cost = document.Cost with { TerminalWeight = TerminalWeightSpec.Stage } });
        Assert.False(model.Diagnostics.Stabilisable);
        Assert.Contains(model.Diagnostics.Warnings, w => w.Code == WarningCode.NotStabilisable);
    }
}
