namespace Lookahead.Client;

/// <summary>
/// One estimator sample: the last answer's estimate (null to start), the input applied since then, the measurement
/// now (null when the reading is missing) and the measured disturbances over the interval.
/// </summary>
public sealed record EstimateRequest
{
    public StateEstimate? Estimate { get; init; }

    public required double[] AppliedInput { get; init; }

    public double[]? Measurement { get; init; }

    public double[]? MeasuredDisturbance { get; init; }
}

public sealed record EstimateResult(
    string ModelId,
    StateEstimate Estimate,
    double[] PredictedMeasurement,
    double[]? Innovation,
    bool MeasurementUsed,
    bool Initialised,
    IReadOnlyList<ServiceWarning> Warnings);
