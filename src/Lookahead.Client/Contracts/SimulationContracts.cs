namespace Lookahead.Client;

/// <summary>A closed-loop run that applies each plan's first move to a "true" plant.</summary>
public sealed record SimulationRequest
{
    public required double[] InitialState { get; init; }

    public required int Steps { get; init; }

    public double[]? PreviousInput { get; init; }

    public IReadOnlyList<ReferenceChange>? References { get; init; }

    public TruePlant? TruePlant { get; init; }

    /// <summary>Unmeasured additive state disturbances, rows of n, at most one per step.</summary>
    public double[][]? Disturbances { get; init; }

    public IReadOnlyList<MeasuredDisturbanceChange>? MeasuredDisturbances { get; init; }

    public IReadOnlyList<OutputDisturbanceChange>? OutputDisturbance { get; init; }

    /// <summary>"state" (the default) or "estimate".</summary>
    public string? Feedback { get; init; }

    public MeasurementNoise? MeasurementNoise { get; init; }
}

public sealed record ReferenceChange(int FromStep, double[] Reference);

public sealed record MeasuredDisturbanceChange(int FromStep, double[] Disturbance);

public sealed record OutputDisturbanceChange(int FromStep, double[] Offset);

public sealed record MeasurementNoise(double[] StandardDeviation, int? Seed = null);

public sealed record TruePlant(double[][] A, double[][] B, string TimeDomain);

/// <summary>
/// Trajectories of a closed-loop run: states, outputs and measurements have steps+1 rows, inputs and references steps
/// rows; the estimates only with feedback "estimate".
/// </summary>
public sealed record SimulationResult(
    string ModelId,
    int Steps,
    double SampleTime,
    double[][] States,
    double[][] Inputs,
    double[][] Outputs,
    double[][]? References,
    double TotalCost,
    int NonOptimalSteps,
    IReadOnlyList<ServiceWarning> Warnings,
    double[][]? Measurements,
    double[][]? Estimates,
    double[][]? DisturbanceEstimates,
    double[][]? EstimatedOutputs);
