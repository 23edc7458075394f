namespace Lookahead.Core.Planning;

/// <summary>What a station sends with each request.</summary>
/// <param name="State">Measured state x_0 (n).</param>
/// <param name="Reference">Output setpoint r (p); null means regulation to the origin.</param>
/// <param name="PreviousInput">u_{−1} (m), the input currently applied; enables the Δu_0 terms.</param>
public sealed record PlanRequest(double[] State, double[]? Reference = null, double[]? PreviousInput = null);
