using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Lookahead.Core.Validation;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

public class ClosedLoopSimulatorTests
{
    private static CompiledModel DoubleIntegrator(int horizon = 20) =>
        ModelCompiler.Compile(TestModels.Discrete([[1.0, 1.0], [0.0, 1.0]], [[0.5], [1.0]], horizon, [1.0, 0.1], [0.5]));

    // With the Riccati terminal weight the receding-horizon law is the LQR law, so the run must equal
    // x_{k+1} = (A − BK) x_k stepped by hand (common practice).
    [Fact]
    public void NominalRunAppliesTheRecedingHorizonGain()
    {
        var model = DoubleIntegrator();
        var result = ClosedLoopSimulator.Simulate(model, new SimulationRequest([3.0, -1.0], 25));
        var k = model.Gain.K;
        double[] x = [3.0, -1.0];
        for (int step = 0; step < 25; step++)
        {
            double u = -(k[0][0] * x[0] + k[0][1] * x[1]);
            Assertions.CloseScalar(u, result.Inputs[step][0], 1e-9, $"u_{step}");
            x = [x[0] + x[1] + 0.5 * u, x[1] + u];
            Assertions.Close(x, result.States[step + 1], 1e-9, $"x_{step + 1}");
        }

        Assert.True(Math.Abs(result.States[^1][0]) < 0.05, "the loop should have settled");
        Assert.Equal(0, result.NonOptimalSteps);
        Assert.True(result.TotalCost > 0);
    }

    [Fact]
    public void TracksAReferenceScheduleToSteadyState()
    {
        var model = DoubleIntegrator();
        var result = ClosedLoopSimulator.Simulate(model, new SimulationRequest([0.0, 0.0], 60, [new ReferenceChange(0, [0.0, 0.0]), new ReferenceChange(10, [2.0, 0.0])]));
        Assert.Equal(60, result.Inputs.Length);
        Assert.Equal(61, result.States.Length);
        Assert.Equal([0.0, 0.0], result.References![5]);
        Assert.Equal([2.0, 0.0], result.References[10]);
        Assertions.Close([2.0, 0.0], result.States[^1], 1e-3);
    }

    [Fact]
    public void ModelMismatchAndDisturbanceChangeTheTrajectory()
    {
        var model = DoubleIntegrator();
        var nominal = ClosedLoopSimulator.Simulate(model, new SimulationRequest([1.0, 0.0], 10));
        var mismatch = ClosedLoopSimulator.Simulate(model, new SimulationRequest([1.0, 0.0], 10, TruePlant: new PlantSpec([[1.0, 1.0], [0.0, 1.0]], [[0.4], [0.8]], null, 1.0)));
        var disturbed = ClosedLoopSimulator.Simulate(model, new SimulationRequest([1.0, 0.0], 10, Disturbances: [[0.0, 0.1], [0.0, 0.1]]));
        Assert.NotEqual(nominal.States[5][0], mismatch.States[5][0]);
        Assertions.Close([nominal.States[1][0], nominal.States[1][1] + 0.1], disturbed.States[1], 1e-12);
    }

    [Fact]
    public void RefusesBadRequestsWithPaths()
    {
        var model = DoubleIntegrator();
        var ex = Assert.Throws<ModelValidationException>(() => ClosedLoopSimulator.Simulate(model, new SimulationRequest([1.0], 0, [new ReferenceChange(0, [1.0])], new PlantSpec([[1.0]], [[1.0]], null, 1.0), [[1.0]])));
        var paths = ex.Errors.Select(e => e.Path).ToList();
        Assert.Contains("steps", paths);
        Assert.Contains("initialState", paths);
        Assert.Contains("references[0].reference", paths);
        Assert.Contains("truePlant", paths);
    }
}
