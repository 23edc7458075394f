using Lookahead.Api.Http;

namespace Lookahead.Api.Simulation;

/// <summary>
/// Trajectories of a closed-loop run: states, outputs, measurements and estimates have steps+1 rows, inputs and
/// references steps rows. Outputs are the true plant's (with any output disturbance), measurements what the sensors
/// read (outputs plus noise). Estimates, disturbance estimates and estimated outputs only with feedback "estimate".
/// </summary>
public sealed record SimulationResponse(
    string ModelId,
    int Steps,
    double SampleTime,
    double[][] States,
    double[][] Inputs,
    double[][] Outputs,
    double[][]? References,
    double TotalCost,
    int NonOptimalSteps,
    IReadOnlyList<WarningDto> Warnings,
    double[][]? Measurements = null,
    double[][]? Estimates = null,
    double[][]? DisturbanceEstimates = null,
    double[][]? EstimatedOutputs = null);
