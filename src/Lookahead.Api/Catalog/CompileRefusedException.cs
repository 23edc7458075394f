namespace Lookahead.Api.Catalog;

/// <summary>
/// A compile was not started or not finished because this instance's budgets are spent for now: the queue is full,
/// the compiles in flight claim the memory budget, or the compile ran past its time budget. Answered 503 with
/// Retry-After: the same request can succeed later or on a less busy instance.
/// </summary>
public sealed class CompileRefusedException(CompileRefusal reason, string message, Exception? innerException = null) : Exception(message, innerException)
{
    /// <summary>What clients are told to wait before retrying: about one typical compile's time.</summary>
    public const int RetryAfterSeconds = 2;

    public CompileRefusal Reason { get; } = reason;
}
