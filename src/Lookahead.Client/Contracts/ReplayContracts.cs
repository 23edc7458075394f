namespace Lookahead.Client;

/// <summary>What each replayed row answers with: the first move and cost, or every field of a plan.</summary>
public enum ReplayDetail
{
    FirstMove,
    Full,
}

/// <summary>
/// One replay row: a plan request (<see cref="State"/> or <see cref="Estimate"/>) or, for a model with an estimator,
/// a <see cref="Measurement"/> with the <see cref="AppliedInput"/>. The first row decides the kind of every row.
/// </summary>
public sealed record ReplayRowRequest
{
    public double[]? State { get; init; }

    public StateEstimate? Estimate { get; init; }

    public double[]? Measurement { get; init; }

    public double[]? AppliedInput { get; init; }

    public VectorOrRows? Reference { get; init; }

    public double[]? PreviousInput { get; init; }

    public VectorOrRows? Disturbance { get; init; }
}

/// <summary>One replayed row (NDJSON). Status "error" carries <see cref="Errors"/> and nothing else.</summary>
public sealed record ReplayRowResult(
    long Row,
    string Status,
    double[]? FirstMove,
    double? Cost,
    double[][]? Inputs,
    double[][]? States,
    double[][]? Outputs,
    PlanTarget? Target,
    IReadOnlyList<ActiveLimit>? ActiveLimits,
    int? Iterations,
    double? MaxOutputViolation,
    double? SoftLimitPenalty,
    StateEstimate? Estimate,
    IReadOnlyList<ServiceWarning>? Warnings,
    IReadOnlyList<ProblemFieldError>? Errors);

/// <summary>
/// The last line of every replay answer. <see cref="Complete"/> false means the service stopped early (reason
/// "shutdown"): replay again from the row after <see cref="Rows"/>.
/// </summary>
public sealed record ReplaySummary(long Rows, long FailedRows, bool Complete, string? Reason);
