namespace Lookahead.Api.Plans;

/// <summary>Body of POST …/plan: measured state x₀ (n), optional setpoint r (p) and the input now applied u₋₁ (m).</summary>
public sealed record PlanRequestDto(double[]? State, double[]? Reference, double[]? PreviousInput);
