using System.Text.Json;
using System.Text.Json.Serialization.Metadata;

namespace Lookahead.Api.Stations;

/// <summary>
/// The station's stored JSON (estimate, vectors, answers, history), written and read with the service's own JSON
/// settings: doubles are written in their shortest round-trip form, so a stored estimate reads back bit for bit.
/// </summary>
internal static class StationJson
{
    public static string Write<T>(T value, JsonSerializerOptions json) => JsonSerializer.Serialize(value, TypeInfo<T>(json));

    public static T Read<T>(string text, JsonSerializerOptions json) =>
        JsonSerializer.Deserialize(text, TypeInfo<T>(json)) ?? throw new InvalidDataException("a station's stored state is empty");

    public static byte[] Bytes<T>(T value, JsonSerializerOptions json) => JsonSerializer.SerializeToUtf8Bytes(value, TypeInfo<T>(json));

    private static JsonTypeInfo<T> TypeInfo<T>(JsonSerializerOptions json) => (JsonTypeInfo<T>)json.GetTypeInfo(typeof(T));
}
