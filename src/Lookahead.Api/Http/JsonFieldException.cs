using System.Text.Json;

namespace Lookahead.Api.Http;

/// <summary>
/// Thrown by our converters: <see cref="RelativePath"/> (e.g. "[2][0]") is appended to the path the serializer
/// records, so the client learns exactly which entry was wrong.
/// </summary>
public sealed class JsonFieldException : JsonException
{
    public JsonFieldException(string reason, string relativePath = "")
        : base(reason)
    {
        Reason = reason;
        RelativePath = relativePath;
    }

    public JsonFieldException()
        : this("is invalid")
    {
    }

    public JsonFieldException(string message, Exception innerException)
        : base(message, innerException)
    {
        Reason = message;
        RelativePath = "";
    }

    public string Reason { get; }

    public string RelativePath { get; }
}
