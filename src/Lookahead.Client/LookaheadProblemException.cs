using System.Net;
using System.Text.Json;

namespace Lookahead.Client;

/// <summary>
/// The service refused a request with an RFC 9457 problem document (or, rarely, with a status and no document, as a
/// proxy might). <see cref="Errors"/> names each field to blame by its JSON path; <see cref="TraceId"/> finds the
/// request in the service's log.
/// </summary>
public sealed class LookaheadProblemException : Exception
{
    public LookaheadProblemException(
        HttpStatusCode status,
        string? type,
        string? title,
        string? detail,
        string? instance,
        string? traceId,
        IReadOnlyList<ProblemFieldError> errors,
        IReadOnlyDictionary<string, JsonElement> extensions,
        TimeSpan? retryAfter)
        : base(Describe(status, title, detail, errors))
    {
        Status = status;
        Type = type;
        Title = title;
        Detail = detail;
        Instance = instance;
        TraceId = traceId;
        Errors = errors;
        Extensions = extensions;
        RetryAfter = retryAfter;
    }

    public LookaheadProblemException()
        : this(HttpStatusCode.InternalServerError, null, null, null, null, null, [], new Dictionary<string, JsonElement>(), null)
    {
    }

    public LookaheadProblemException(string message)
        : base(message)
    {
        Errors = [];
        Extensions = new Dictionary<string, JsonElement>();
    }

    public LookaheadProblemException(string message, Exception innerException)
        : base(message, innerException)
    {
        Errors = [];
        Extensions = new Dictionary<string, JsonElement>();
    }

    public HttpStatusCode Status { get; }

    /// <summary>The problem type, e.g. <c>urn:lookahead:problem:validation</c>.</summary>
    public string? Type { get; }

    public string? Title { get; }

    public string? Detail { get; }

    public string? Instance { get; }

    public string? TraceId { get; }

    /// <summary>Each field to blame: its path and the reason. Empty when no single field is.</summary>
    public IReadOnlyList<ProblemFieldError> Errors { get; }

    /// <summary>Members beyond the standard ones (e.g. <c>currentSequence</c> of a station's 409).</summary>
    public IReadOnlyDictionary<string, JsonElement> Extensions { get; }

    /// <summary>The Retry-After the service sent with a 429 or 503 that the client gave up retrying.</summary>
    public TimeSpan? RetryAfter { get; }

    private static string Describe(HttpStatusCode status, string? title, string? detail, IReadOnlyList<ProblemFieldError> errors)
    {
        string head = $"{(int)status} {title ?? status.ToString()}";
        if (!string.IsNullOrEmpty(detail))
        {
            head += ": " + detail;
        }

        return errors.Count == 0 ? head : head + " (" + string.Join("; ", errors.Select(e => $"{e.Path}: {e.Reason}")) + ")";
    }
}
