using Lookahead.Api.Http;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Replay;

/// <summary>Where replay rows come from (NDJSON, JSON, CSV). Filling is sequential; parsing a filled row may run on any thread.</summary>
internal interface IReplaySource
{
    /// <summary>Fills the batch with the next rows; false when the input has ended and nothing was added.</summary>
    ValueTask<bool> FillAsync(ReplayBatch batch, CancellationToken cancellationToken);

    /// <summary>What the rows carry; fixed by <see cref="ChooseMode"/> before any row is parsed.</summary>
    ReplayMode Mode { get; }

    /// <summary>
    /// Fixes <see cref="Mode"/> from the first batch (CSV: from its header, already read). Runs before any result is
    /// written, so its errors are the whole request's (400).
    /// </summary>
    IReadOnlyList<ProblemError> ChooseMode(ReplayBatch first, CompiledModel model);

    /// <summary>Turns the row's raw bytes into its vectors, or records its errors. Thread-safe.</summary>
    void Parse(ReplayRow row);

    /// <summary>Where the row sits in the body, prepended to its field paths ("" or "requests[3].").</summary>
    string PathPrefix(ReplayRow row);
}

/// <summary>Where replay results go. Formatting a row may run on any thread; writing is sequential, in input order.</summary>
internal interface IReplaySink
{
    ValueTask StartAsync(CancellationToken cancellationToken);

    /// <summary>True when rows need every field of a plan; otherwise the cheaper first-move path serves them.</summary>
    bool NeedsFullPlan { get; }

    /// <summary>Formats the row's result into its output buffer. Thread-safe.</summary>
    void Format(ReplayRow row, System.Text.Json.Utf8JsonWriter scratch);

    ValueTask WriteAsync(ReplayBatch batch, CancellationToken cancellationToken);

    ValueTask CompleteAsync(ReplaySummary summary, CancellationToken cancellationToken);
}

/// <summary>
/// Totals every replay ends with, so that no client mistakes a stream cut short for a whole one. A replay the host
/// stopped (<see cref="ShutdownReason"/>) is not complete; a replay whose client left writes nothing more.
/// </summary>
internal sealed record ReplaySummary(long Rows, long FailedRows, IReadOnlyList<WarningDto> Warnings, string? CutReason = null)
{
    /// <summary>The host began to stop: the rows already planned were written, the rest of the upload was not read.</summary>
    public const string ShutdownReason = "shutdown";

    public bool Complete => CutReason is null;
}

/// <summary>A replay's end: its totals, or the errors that refused it before any result was written.</summary>
internal sealed record ReplayRun(ReplaySummary? Summary, IReadOnlyList<ProblemError> Errors);
