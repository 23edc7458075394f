using Lookahead.Client;

namespace Lookahead.Client.Tests.Support;

/// <summary>Model documents the tests register, written with the client's own types.</summary>
public static class Models
{
    /// <summary>A discrete double integrator (position, velocity), one force input, horizon 10, force within ±1.</summary>
    public static ModelDocument DoubleIntegrator(string name = "double-integrator") => new()
    {
        Name = name,
        Plant = new PlantSettings
        {
            A = [[1.0, 0.1], [0.0, 1.0]],
            B = [[0.005], [0.1]],
            SampleTime = 0.1,
            TimeDomain = "discrete",
        },
        Cost = new CostSettings
        {
            Horizon = 10,
            OutputWeight = Weight.Diagonal(1.0, 0.1),
            InputWeight = Weight.Diagonal(0.01),
        },
        Limits = new LimitSettings { InputMin = [-1.0], InputMax = [1.0] },
        Labels = new LabelSettings { States = ["position", "velocity"], Inputs = ["force"], Outputs = ["position", "velocity"] },
    };

    /// <summary>The same plant with full-matrix weights and an explicit terminal weight.</summary>
    public static ModelDocument DoubleIntegratorWithMatrices() => DoubleIntegrator("double-integrator-matrices") with
    {
        Cost = new CostSettings
        {
            Horizon = 10,
            OutputWeight = Weight.Full([[1.0, 0.0], [0.0, 0.1]]),
            InputWeight = Weight.Full([[0.01]]),
            InputRateWeight = Weight.Diagonal(0.001),
            TerminalWeight = TerminalWeight.Full([[5.0, 0.5], [0.5, 2.0]]),
        },
    };
}
