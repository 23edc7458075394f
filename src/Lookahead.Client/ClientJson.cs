using System.Text.Json;
using System.Text.Json.Serialization;

namespace Lookahead.Client;

/// <summary>The wire's JSON: camelCase names, nulls left out when writing (an absent field is the service's default).</summary>
internal static class ClientJson
{
    public static JsonSerializerOptions Options { get; } = new(JsonSerializerDefaults.Web)
    {
        DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull,
        NumberHandling = JsonNumberHandling.Strict,
    };

    /// <summary>For NDJSON: one value per line, no indentation.</summary>
    public static byte[] ToUtf8(object value, Type type) => JsonSerializer.SerializeToUtf8Bytes(value, type, Options);
}
