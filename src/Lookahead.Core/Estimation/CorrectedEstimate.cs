namespace Lookahead.Core.Estimation;

/// <summary>The result of correcting a prior estimate x̂⁻ with the measurement of the same sample.</summary>
/// <param name="Estimate">Posterior x̂⁺ = x̂⁻ + L(y − C_a x̂⁻); equal to the prior when no measurement was used.</param>
/// <param name="PredictedMeasurement">C_a x̂⁻, the measurement the prior expected (p entries).</param>
/// <param name="Innovation">y − C_a x̂⁻ (p entries); null when the measurement was missing.</param>
/// <param name="MeasurementUsed">False when the measurement was missing and the prior was passed on uncorrected.</param>
public sealed record CorrectedEstimate(
    StateEstimate Estimate,
    double[] PredictedMeasurement,
    double[]? Innovation,
    bool MeasurementUsed);
