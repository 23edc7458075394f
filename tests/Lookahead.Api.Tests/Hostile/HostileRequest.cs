using System.Text;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>One request of the hostile corpus: what is sent, which family of mutation made it, and what the answer must be.</summary>
/// <param name="Family">The mutation family ("model-matrix-entry", "path-id", …); the quick slice samples every family.</param>
/// <param name="ContentType">Sent as is (it may itself be the mutation); null sends no Content-Type.</param>
/// <param name="Body">Raw bytes (they may be invalid UTF-8); null sends no body.</param>
public sealed record HostileRequest(string Family, HttpMethod Method, string Path, string? ContentType, byte[]? Body, Expectation Expect)
{
    public static HostileRequest Json(string family, HttpMethod method, string path, string body, Expectation expect) =>
        new(family, method, path, "application/json", Encoding.UTF8.GetBytes(body), expect);

    /// <summary>A one-line description for failure messages: the family, the route and the start of the body.</summary>
    public override string ToString()
    {
        string path = Path.Length > 120 ? Path[..120] + $"…({Path.Length} chars)" : Path;
        string body = Body is null ? "(no body)" : Encoding.UTF8.GetString(Body, 0, Math.Min(Body.Length, 200)).ReplaceLineEndings("⏎");
        if (Body is { Length: > 200 })
        {
            body += $"…({Body.Length} bytes)";
        }

        return $"[{Family}] {Method} {path} ({ContentType ?? "no content type"}) {body}";
    }
}

/// <summary>What the answer to a hostile request must be.</summary>
/// <param name="Statuses">The 4xx statuses accepted for a refusal (empty: any 4xx).</param>
/// <param name="Path">When set, a refusal must name this field: an error whose path is it, or lies under it.</param>
/// <param name="MayAnswer">
/// Only for endpoints that store nothing: the mutation may happen to be a valid request (1e-400 is 0; 1e308 in a
/// state may still plan), so a 2xx answer is accepted — it must then be well-formed JSON without NaN or Infinity.
/// </param>
/// <param name="ReplayRow">
/// A replay whose bad part is a row: replay streams, so a bad row after the header is answered in the 200 stream as a
/// row with status "error" (the documented contract); a 4xx problem for the whole upload is also accepted.
/// </param>
public sealed record Expectation(int[] Statuses, string? Path = null, bool MayAnswer = false, bool ReplayRow = false)
{
    public static Expectation Refused(params int[] statuses) => new(statuses);

    /// <summary>A 400 naming <paramref name="path"/>.</summary>
    public static Expectation BadField(string path) => new([400], path);

    public static Expectation BadRequest { get; } = new([400]);

    public static Expectation NotFound { get; } = new([404]);

    public static Expectation UnsupportedMediaType { get; } = new([415]);

    public static Expectation MethodNotAllowed { get; } = new([405]);

    /// <summary>Refused with 400 naming the field, or answered (stateless endpoints only).</summary>
    public static Expectation FieldOrAnswer(string? path) => new([400], path, MayAnswer: true);

    public static Expectation BadRow { get; } = new([400], ReplayRow: true);
}
