namespace Lookahead.Core.Estimation;

/// <summary>
/// One sample of the estimator for a station that keeps only the last answer: the estimate it was given at the last
/// sample, the input it applied since then, and what it measures now.
/// </summary>
/// <param name="Previous">The last answer's <see cref="EstimateResult.Estimate"/> (x̂⁺ of the previous sample); null to start.</param>
/// <param name="AppliedInput">u held since the previous sample (m); at the start, the input the plant is held at.</param>
/// <param name="Measurement">y now (p); null when the reading is missing (the estimate is then only propagated).</param>
/// <param name="MeasuredDisturbance">v over the interval (q), for a model with measured disturbances; null means zero.</param>
public sealed record EstimateRequest(StateEstimate? Previous, double[] AppliedInput, double[]? Measurement, double[]? MeasuredDisturbance = null);

/// <summary>The estimator's answer for this sample.</summary>
/// <param name="Estimate">x̂⁺ now (plan from it; send it back next time).</param>
/// <param name="PredictedMeasurement">What the propagated estimate expected to measure, C x̂⁻ + C_d d̂⁻.</param>
/// <param name="Innovation">Measurement − prediction; null when the reading was missing.</param>
/// <param name="MeasurementUsed">False when the reading was missing and the estimate was only propagated.</param>
/// <param name="Initialised">True when no previous estimate was given and this one was fitted to the measurement at steady state.</param>
public sealed record EstimateResult(StateEstimate Estimate, double[] PredictedMeasurement, double[]? Innovation, bool MeasurementUsed, bool Initialised);
