namespace Lookahead.Api.Storage;

/// <summary>
/// The store cannot serve the call now (unreachable, not writable, its file gone): the caller is told to retry later
/// with a 503, never a 500. The message is written for the client and names no connection setting; the cause (kept as
/// the inner exception) goes to the log only.
/// </summary>
public sealed class StoreUnavailableException(string message, Exception? innerException = null) : Exception(message, innerException)
{
    /// <summary>What clients are told to wait before retrying: long enough for a restart or fail-over to show.</summary>
    public const int RetryAfterSeconds = 5;
}
