namespace Lookahead.Client;

/// <summary>
/// A plan request: the measured <see cref="State"/> (or, for a model with an estimator, an <see cref="Estimate"/>),
/// an optional setpoint (held or scheduled), the input now applied and measured disturbances (held or forecast).
/// </summary>
public sealed record PlanRequest
{
    public double[]? State { get; init; }

    public StateEstimate? Estimate { get; init; }

    public VectorOrRows? Reference { get; init; }

    public double[]? PreviousInput { get; init; }

    public VectorOrRows? Disturbance { get; init; }
}

/// <summary>
/// The optimal input sequence and its predicted trajectory. Treat any <see cref="Status"/> other than "optimal", or
/// any warning, as not fit to apply unchecked.
/// </summary>
public sealed record PlanResult(
    string ModelId,
    string? Alias,
    string Status,
    double[][] Inputs,
    double[][] States,
    double[][] Outputs,
    double Cost,
    PlanTarget? Target,
    IReadOnlyList<ActiveLimit> ActiveLimits,
    int Iterations,
    double MaxOutputViolation,
    double SoftLimitPenalty,
    IReadOnlyList<ServiceWarning> Warnings,
    double SolveMicroseconds)
{
    /// <summary>The move to apply now: the first row of <see cref="Inputs"/>.</summary>
    public double[] FirstMove => Inputs.Length > 0 ? Inputs[0] : [];
}

/// <summary>The equilibrium the plan steers to when a reference was given.</summary>
public sealed record PlanTarget(double[] State, double[] Input, double[] Output, bool ReferenceReached, bool LimitedByInputLimits);

/// <summary>A limit the plan presses against: kind (input-min, input-max, input-rate-min, input-rate-max, output-min, output-max), step and index.</summary>
public sealed record ActiveLimit(string Kind, int Step, int Index);

/// <summary>An estimate of the augmented state: the plant's states and the disturbance estimate d̂.</summary>
public sealed record StateEstimate(double[] State, double[] Disturbance);
