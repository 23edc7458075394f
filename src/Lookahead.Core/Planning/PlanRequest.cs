namespace Lookahead.Core.Planning;

/// <summary>What a station sends with each request.</summary>
/// <param name="State">Measured state x_0 (n).</param>
/// <param name="Reference">Output setpoint r (p) held over the horizon; null means regulation to the origin.</param>
/// <param name="PreviousInput">u_{−1} (m), the input currently applied; enables the Δu_0 terms.</param>
/// <param name="ReferenceSchedule">
/// Instead of <paramref name="Reference"/>: 1…N rows of p, row k the setpoint r_k of the stage-k output term, the last
/// row held to the end of the horizon. The steady-state target is computed for the last row.
/// </param>
/// <param name="Disturbance">
/// Measured disturbances: 1…N rows of q, row k the v_k in x_{k+1} = A x_k + B u_k + E v_k, the last row held to the
/// end (one row: held over the horizon). The steady-state target balances the last row. Null means v = 0.
/// </param>
/// <param name="DisturbanceEstimate">
/// d̂ of the model's estimator (n_d), when <paramref name="State"/> is an estimate x̂ rather than a measurement: the
/// plan then predicts y_k = C x_k + C_d d̂ (output disturbances) or x_{k+1} = A x_k + B(u_k + d̂) (input
/// disturbances), and its target holds the setpoint against d̂ — which is what removes the steady offset.
/// </param>
public sealed record PlanRequest(
    double[] State,
    double[]? Reference = null,
    double[]? PreviousInput = null,
    double[][]? ReferenceSchedule = null,
    double[][]? Disturbance = null,
    double[]? DisturbanceEstimate = null)
{
    /// <summary>True when the request carries a schedule, a disturbance or a disturbance estimate: the plan then takes the preview path.</summary>
    public bool HasPreview => ReferenceSchedule is not null || Disturbance is not null || DisturbanceEstimate is not null;

    /// <summary>The setpoint the target is computed for: the reference, or the schedule's last row; null for none.</summary>
    public double[]? FinalReference => ReferenceSchedule is { Length: > 0 } rows ? rows[^1] : Reference;

    /// <summary>The disturbance the target balances: the last row; null for none.</summary>
    public double[]? FinalDisturbance => Disturbance is { Length: > 0 } rows ? rows[^1] : null;
}
