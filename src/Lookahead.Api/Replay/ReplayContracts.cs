using Lookahead.Api.Estimation;
using Lookahead.Api.Http;
using Lookahead.Api.Plans;

namespace Lookahead.Api.Replay;

/// <summary>
/// JSON replay body. Read as a stream: put "detail" before "requests" (or use ?detail=) so that it applies to every row.
/// </summary>
public sealed record ReplayRequest(string? Detail, IReadOnlyList<ReplayRowRequest>? Requests);

/// <summary>
/// One replay row (documentation only; the rows are read by the plan parser or, in an estimation replay, by
/// <c>EstimationRowParser</c>). A plain row is a plan request: "state" (or "estimate"), "reference"?,
/// "previousInput"?, "disturbance"?. An estimation row, for a model with an estimator, gives "measurement" (p, or null
/// when the reading is missing) and "appliedInput" (m, the input held over the interval that ends at this
/// measurement, also the plan's previous input) instead, with "reference"? and "disturbance"? (one q-vector: the value
/// over that interval, held over the horizon). The first row decides which kind every row of the replay is.
/// </summary>
public sealed record ReplayRowRequest(
    double[]? State,
    StateEstimateDto? Estimate,
    double[]? Measurement,
    double[]? AppliedInput,
    VectorOrRows? Reference,
    double[]? PreviousInput,
    VectorOrRows? Disturbance);

/// <summary>
/// JSON replay answer, streamed: results come in input order, one per request. complete is false when the service
/// began to stop during the replay: the rows already planned are there, the rest of the upload was not read, and
/// reason says why ("shutdown").
/// </summary>
public sealed record ReplayResponse(string ModelId, string Detail, IReadOnlyList<ReplayRowResult> Results, long Rows, long FailedRows, bool Complete, string? Reason, IReadOnlyList<string> Warnings);

/// <summary>
/// One replayed row. Row numbers are 1-based positions in the input (NDJSON: the line number).
/// status is optimal, iteration-limit, infeasible or error; an error row carries errors and nothing else. In an
/// estimation replay a planned row also carries the estimate it was planned from.
/// </summary>
public sealed record ReplayRowResult(
    long Row,
    string Status,
    double[]? FirstMove,
    double? Cost,
    double[][]? Inputs,
    double[][]? States,
    double[][]? Outputs,
    TargetDto? Target,
    IReadOnlyList<ActiveLimitDto>? ActiveLimits,
    int? Iterations,
    double? MaxOutputViolation,
    double? SoftLimitPenalty,
    StateEstimateDto? Estimate,
    IReadOnlyList<WarningDto>? Warnings,
    IReadOnlyList<ProblemError>? Errors);
