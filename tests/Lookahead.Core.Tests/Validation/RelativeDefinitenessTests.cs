using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Numerics;
using Lookahead.Core.Tests.Support;
using Lookahead.Core.Validation;
using Xunit;

namespace Lookahead.Core.Tests.Validation;

/// <summary>Definiteness of the weights is judged against each weight's own scale, so a model's units do not decide it.</summary>
public class RelativeDefinitenessTests
{
    private static ModelDocument DoubleIntegrator(WeightSpec r, WeightSpec? q = null, double[][]? b = null, TerminalWeightSpec? terminal = null) =>
        new("test", new PlantSpec([[1.0, 0.1], [0.0, 1.0]], b ?? [[0.005], [0.1]], null, 0.1), new CostSpec(10, q ?? WeightSpec.FromDiagonal([1.0, 0.1]), r, null, terminal));

    // 1e-10 with the default Riccati terminal weight; 1e-300 with the stage weight (see the next test for why).
    [Theory]
    [InlineData(1e-10, false)]
    [InlineData(1e-300, true)]
    public void AcceptsAnInputWeightThatIsSmallButPositiveDefinite(double scale, bool stage)
    {
        var document = DoubleIntegrator(WeightSpec.FromDiagonal([scale]), terminal: stage ? TerminalWeightSpec.Stage : null);

        Assert.Empty(ModelValidator.Validate(document));
        var model = Bounded.Run(() => ModelCompiler.Compile(document));
        var plan = model.Plan(new PlanRequest([1.0, 0.0]));
        Assert.All(plan.Inputs, u => Assert.True(double.IsFinite(u)));
        Assert.True(double.IsFinite(plan.Cost));
    }

    // Q/R = 1e300 puts B·R⁻¹·Bᵀ near 1e298 and the doubling overflows: 'riccati' is refused with the reason,
    // as a bad request naming the terminal weight (the stage weight or an explicit one still work).
    [Fact]
    public void AnInputWeightTooSmallForTheRiccatiWeightIsRefusedNamingTheTerminalWeight()
    {
        var document = DoubleIntegrator(WeightSpec.FromDiagonal([1e-300]));

        Assert.Empty(ModelValidator.Validate(document));
        var ex = Assert.Throws<ModelValidationException>(() => Bounded.Run(() => ModelCompiler.Compile(document)));
        var error = Assert.Single(ex.Errors);
        Assert.Equal("cost.terminalWeight", error.Path);
        Assert.Contains("'riccati' is not available", error.Reason, StringComparison.Ordinal);
    }

    // Scale-free: multiplying every weight by the same positive number changes neither acceptance nor the plan.
    [Fact]
    public void ScalingEveryWeightTogetherGivesTheSamePlan()
    {
        var unit = ModelCompiler.Compile(DoubleIntegrator(WeightSpec.FromDiagonal([0.01]), terminal: TerminalWeightSpec.Stage));
        var tiny = ModelCompiler.Compile(DoubleIntegrator(WeightSpec.FromDiagonal([0.01e-12]), WeightSpec.FromDiagonal([1e-12, 0.1e-12]), terminal: TerminalWeightSpec.Stage));
        var request = new PlanRequest([1.0, -0.5]);

        Assertions.Close(unit.Plan(request).Inputs, tiny.Plan(request).Inputs, 1e-9);
    }

    [Fact]
    public void RefusesAZeroInputWeight()
    {
        var errors = ModelValidator.Validate(DoubleIntegrator(WeightSpec.FromMatrix([[0.0]])));

        Assert.Contains(errors, e => e.Path == "cost.inputWeight" && e.Reason.Contains("positive definite", StringComparison.Ordinal));
    }

    [Fact]
    public void RefusesAnInputWeightWithANegativeEigenvalueAndSaysItIsJudgedRelatively()
    {
        var document = DoubleIntegrator(WeightSpec.FromMatrix([[2.1, 0.0], [0.0, -3e-5]]), b: [[0.005, 0.0], [0.1, 0.1]]);

        var error = Assert.Single(ModelValidator.Validate(document));
        Assert.Equal("cost.inputWeight", error.Path);
        Assert.Contains("positive definite", error.Reason, StringComparison.Ordinal);
        Assert.Contains("relative to its largest eigenvalue", error.Reason, StringComparison.Ordinal);
        Assert.Throws<ModelValidationException>(() => ModelCompiler.Compile(document));
    }

    // 1e-12·diag(1, −1e-8): the negative eigenvalue is 1e-8 of the weight's own scale, far beyond rounding.
    [Fact]
    public void RefusesAnOutputWeightThatIsIndefiniteRelativeToItsOwnScale()
    {
        var errors = ModelValidator.Validate(DoubleIntegrator(WeightSpec.FromDiagonal([1.0]), WeightSpec.FromDiagonal([1e-12, -1e-20])));

        Assert.Contains(errors, e => e.Path == "cost.outputWeight" && e.Reason.Contains("semidefinite", StringComparison.Ordinal));
    }

    // 1e12·diag(1, −1e-13): the negative eigenvalue is rounding next to the weight's scale, so the weight is accepted.
    [Fact]
    public void AcceptsAnOutputWeightWhoseNegativeEigenvalueIsRoundingRelativeToItsScale() =>
        Assert.Empty(ModelValidator.Validate(DoubleIntegrator(WeightSpec.FromDiagonal([1.0]), WeightSpec.FromDiagonal([1e12, -0.1]))));

    // Two inputs that act identically and an input weight at the bottom of the double range: the condensed
    // Hessian is singular to working precision. That is a bad request naming the input weight, not a crash.
    [Fact]
    public void ATinyInputWeightThatLeavesTheHessianSingularIsRefusedNamingTheInputWeight()
    {
        var document = DoubleIntegrator(WeightSpec.FromDiagonal([1e-300, 1e-300]), b: [[0.005, 0.005], [0.1, 0.1]], terminal: TerminalWeightSpec.Stage);

        Assert.Empty(ModelValidator.Validate(document));
        var ex = Assert.Throws<ModelValidationException>(() => Bounded.Run(() => ModelCompiler.Compile(document)));
        var error = Assert.Single(ex.Errors);
        Assert.Equal("cost.inputWeight", error.Path);
        Assert.Contains("Hessian", error.Reason, StringComparison.Ordinal);
    }
}
