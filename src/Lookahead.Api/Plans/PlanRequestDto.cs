namespace Lookahead.Api.Plans;

/// <summary>
/// Body of POST …/plan (documentation only; <see cref="PlanRequestParser"/> reads requests): measured state x₀ (n);
/// optional setpoint — one p-vector held over the horizon, or a schedule of 1…N rows of p (the last held); the input
/// now applied u₋₁ (m); measured disturbances — one q-vector held, or a forecast of 1…N rows of q (the last held).
/// </summary>
/// <param name="Estimate">Instead of <paramref name="State"/>, for a model with an estimator: { state, disturbance } as /estimate answers.</param>
public sealed record PlanRequestDto(double[]? State, VectorOrRows? Reference, double[]? PreviousInput, VectorOrRows? Disturbance = null, Estimation.StateEstimateDto? Estimate = null);
