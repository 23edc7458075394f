using Lookahead.Api.Http;

namespace Lookahead.Api.Estimation;

/// <summary>An estimate of the augmented state: the plant's states (engineering units with an operating point) and the disturbance estimate d̂ (an offset, never shifted).</summary>
public sealed record StateEstimateDto(double[]? State, double[]? Disturbance);

/// <summary>
/// Body of POST …/estimate: the last answer's estimate (omit it to start), the input applied since then (at the start:
/// the input the plant is held at), the measurement now (null when the reading is missing) and, for a model with
/// measured disturbances, their values over the interval.
/// </summary>
public sealed record EstimateRequestDto(StateEstimateDto? Estimate, double[]? AppliedInput, double[]? Measurement, double[]? MeasuredDisturbance);

/// <summary>The estimate for now (plan from it with "estimate", send it back next time), what was expected to be measured, and the innovation.</summary>
public sealed record EstimateResponse(
    string ModelId,
    StateEstimateDto Estimate,
    double[] PredictedMeasurement,
    double[]? Innovation,
    bool MeasurementUsed,
    bool Initialised,
    IReadOnlyList<WarningDto> Warnings);
