using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

public class DiagnosticsTests
{
    // Common practice: the double integrator with a force input is controllable (rank 2); its Riccati terminal
    // weight makes the receding-horizon loop stable.
    [Fact]
    public void DoubleIntegratorIsControllableAndClosedLoopStable()
    {
        var model = ModelCompiler.Compile(TestModels.Discrete([[1.0, 1.0], [0.0, 1.0]], [[0.5], [1.0]], 10, [1.0, 1.0], [1.0]));
        Assert.Equal(2, model.Diagnostics.ControllabilityRank);
        Assert.True(model.Diagnostics.Controllable);
        Assert.True(model.Diagnostics.Stabilisable);
        Assert.True(model.Diagnostics.Detectable);
        Assert.NotNull(model.Diagnostics.RiccatiResidual);
        Assert.True(model.Diagnostics.RiccatiResidual <= 1e-10);
        Assert.InRange(model.Diagnostics.ClosedLoopSpectralRadius, 0, 0.999);
        Assert.Equal(model.Diagnostics.ClosedLoopSpectralRadius, model.Gain.SpectralRadius);
        Assert.Equal(2, model.Gain.ClosedLoopEigenvalues.Length);
        Assert.DoesNotContain(model.Diagnostics.Warnings, w => w.Code == WarningCode.ClosedLoopUnstable);
    }

    [Fact]
    public void UncontrollableStableModeIsReportedButAccepted()
    {
        var model = ModelCompiler.Compile(TestModels.Discrete([[0.9, 0.0], [0.0, 0.5]], [[1.0], [0.0]], 5, [1.0, 1.0], [1.0]));
        Assert.Equal(1, model.Diagnostics.ControllabilityRank);
        Assert.False(model.Diagnostics.Controllable);
        Assert.True(model.Diagnostics.Stabilisable);
        Assert.Contains(model.Diagnostics.Warnings, w => w.Code == WarningCode.NotControllable && w.Count == 1);
    }

    // Common practice: an unstable plant, a one-step horizon, a tiny stage terminal weight and an expensive
    // input give a receding-horizon loop that does not stabilise; the warning must say so.
    [Fact]
    public void WarnsWhenTheRecedingHorizonLoopIsUnstable()
    {
        var model = ModelCompiler.Compile(TestModels.Discrete([[1.2]], [[1.0]], 1, [0.01], [10.0], TerminalWeightSpec.Stage));
        Assert.True(model.Diagnostics.ClosedLoopSpectralRadius >= 1);
        Assert.Contains(model.Diagnostics.Warnings, w => w.Code == WarningCode.ClosedLoopUnstable && w.Amount >= 1);
    }

    [Fact]
    public void WarnsWhenAnUnstableModeIsInvisibleToTheOutputWeight()
    {
        var model = ModelCompiler.Compile(TestModels.Discrete([[1.1, 0.0], [0.0, 0.5]], [[1.0], [1.0]], 5, [1.0], [1.0], TerminalWeightSpec.Stage, c: [[0.0, 1.0]]));
        Assert.False(model.Diagnostics.Detectable);
        Assert.Contains(model.Diagnostics.Warnings, w => w.Code == WarningCode.ModeUnseenByCost);
    }

    [Fact]
    public void WarnsWhenTheHessianIsIllConditioned()
    {
        var model = ModelCompiler.Compile(
            TestModels.Discrete([[1.1, 0.2, 0.0], [0.0, 0.9, 0.3], [0.1, 0.0, 0.7]], [[0.0], [0.5], [1.0]], 60, [1.0, 1.0, 1.0], [0.1]),
            new CompileOptions { IllConditionedThreshold = 1e6 });
        Assert.True(model.Diagnostics.HessianCondition > 1e6);
        Assert.Contains(model.Diagnostics.Warnings, w => w.Code == WarningCode.HessianIllConditioned && w.Amount > 1e6);
    }

    // Common practice: the condition number of a diagonal Hessian is the ratio of its extreme entries.
    [Fact]
    public void HessianConditionOfAStaticPlantIsTheWeightRatio()
    {
        // A = 0, B = 0: the Hessian is R on every block, so κ = max R / min R.
        var model = ModelCompiler.Compile(TestModels.Discrete([[0.0]], [[0.0, 0.0]], 4, [1.0], [2.0, 8.0], TerminalWeightSpec.Stage));
        Assertions.CloseScalar(4.0, model.Diagnostics.HessianCondition, 1e-12);
    }
}
