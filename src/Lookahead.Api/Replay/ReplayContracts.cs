using Lookahead.Api.Http;
using Lookahead.Api.Plans;

namespace Lookahead.Api.Replay;

/// <summary>
/// JSON replay body. Read as a stream: put "detail" before "requests" (or use ?detail=) so that it applies to every row.
/// </summary>
public sealed record ReplayRequest(string? Detail, IReadOnlyList<PlanRequestDto>? Requests);

/// <summary>JSON replay answer, streamed: results come in input order, one per request.</summary>
public sealed record ReplayResponse(string ModelId, string Detail, IReadOnlyList<ReplayRowResult> Results, long Rows, long FailedRows, IReadOnlyList<string> Warnings);

/// <summary>
/// One replayed row. Row numbers are 1-based positions in the input (NDJSON: the line number).
/// status is optimal, iteration-limit, infeasible or error; an error row carries errors and nothing else.
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
    IReadOnlyList<string>? Warnings,
    IReadOnlyList<ProblemError>? Errors);
