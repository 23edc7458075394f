namespace Lookahead.Client;

/// <summary>A station: its binding (a model id or an alias name), its counters and the state it carries between steps.</summary>
public sealed record StationDetails(
    string Name,
    string Model,
    string ModelId,
    string Detail,
    long Sequence,
    long StepCount,
    StateEstimate? Estimate,
    double[]? LastAppliedInput,
    double[]? LastSuggestedMove,
    DateTimeOffset? LastTimestamp,
    DateTimeOffset UpdatedAt);

/// <summary>
/// One sample for a station: its current sequence, the measurement (null when missing), what the plant received
/// (null: the last suggested move), the setpoint and measured disturbances, the plant time and the mode ("auto" or "track").
/// </summary>
public sealed record StationStepRequest
{
    public required long Sequence { get; init; }

    public double[]? Measurement { get; init; }

    public double[]? AppliedInput { get; init; }

    public VectorOrRows? Reference { get; init; }

    public VectorOrRows? Disturbance { get; init; }

    public DateTimeOffset? Timestamp { get; init; }

    public string? Mode { get; init; }
}

/// <summary>A step's answer: the new sequence, the estimate, the move to apply now and the plan's status.</summary>
public sealed record StationStepResult(
    long Sequence,
    string ModelId,
    StateEstimate Estimate,
    double[] AppliedInput,
    double[]? FirstMove,
    PlanResult? Plan,
    string Status,
    int MissedSamples,
    IReadOnlyList<ServiceWarning> Warnings);
