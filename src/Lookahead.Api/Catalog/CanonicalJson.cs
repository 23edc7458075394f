using System.Buffers;
using System.Globalization;
using System.Text.Encodings.Web;
using System.Text.Json;

namespace Lookahead.Api.Catalog;

/// <summary>
/// The canonical form that model ids hash: object keys sorted by ordinal, no whitespace, every number written
/// as the shortest round-trip ("R") form of its double (so 1, 1.0 and 1e0 are the same and −0 is 0), nulls
/// and empty objects dropped from objects (but kept inside arrays, where a null limit means "unbounded").
/// </summary>
public static class CanonicalJson
{
    private static readonly JsonWriterOptions WriterOptions = new()
    {
        Indented = false,
        SkipValidation = false,
        Encoder = JavaScriptEncoder.Default,
    };

    public static byte[] Write(JsonElement element)
    {
        var buffer = new ArrayBufferWriter<byte>();
        using (var writer = new Utf8JsonWriter(buffer, WriterOptions))
        {
            WriteValue(writer, element);
        }

        return buffer.WrittenSpan.ToArray();
    }

    private static void WriteValue(Utf8JsonWriter writer, JsonElement element)
    {
        switch (element.ValueKind)
        {
            case JsonValueKind.Object:
                writer.WriteStartObject();
                var properties = new List<JsonProperty>();
                foreach (var property in element.EnumerateObject())
                {
                    if (!IsAbsent(property.Value))
                    {
                        properties.Add(property);
                    }
                }

                properties.Sort((x, y) => string.CompareOrdinal(x.Name, y.Name));
                foreach (var property in properties)
                {
                    writer.WritePropertyName(property.Name);
                    WriteValue(writer, property.Value);
                }

                writer.WriteEndObject();
                break;
            case JsonValueKind.Array:
                writer.WriteStartArray();
                foreach (var item in element.EnumerateArray())
                {
                    WriteValue(writer, item);
                }

                writer.WriteEndArray();
                break;
            case JsonValueKind.Number:
                double value = element.GetDouble();
                if (value == 0)
                {
                    value = 0; // folds −0 into 0
                }

                writer.WriteRawValue(value.ToString("R", CultureInfo.InvariantCulture), skipInputValidation: false);
                break;
            case JsonValueKind.String:
                writer.WriteStringValue(element.GetString());
                break;
            case JsonValueKind.True:
            case JsonValueKind.False:
                writer.WriteBooleanValue(element.GetBoolean());
                break;
            default:
                writer.WriteNullValue();
                break;
        }
    }

    private static bool IsAbsent(JsonElement value)
    {
        if (value.ValueKind == JsonValueKind.Null)
        {
            return true;
        }

        if (value.ValueKind != JsonValueKind.Object)
        {
            return false;
        }

        foreach (var property in value.EnumerateObject())
        {
            if (!IsAbsent(property.Value))
            {
                return false;
            }
        }

        return true;
    }
}
