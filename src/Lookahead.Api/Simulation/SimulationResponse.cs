using Lookahead.Api.Http;

namespace Lookahead.Api.Simulation;

/// <summary>Trajectories of a closed-loop run: states and outputs have steps+1 rows, inputs and references steps rows.</summary>
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
    IReadOnlyList<WarningDto> Warnings);
