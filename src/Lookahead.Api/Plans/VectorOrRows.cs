using System.Text.Json;
using System.Text.Json.Serialization;
using Lookahead.Api.Http;

namespace Lookahead.Api.Plans;

/// <summary>
/// A value held over the horizon (one vector) or a schedule of 1…N rows, the last held to the end: how a plan request
/// gives its setpoint and its measured disturbances. Requests are read by <see cref="PlanRequestParser"/>; this type
/// describes the field in the contract and round-trips it where a document is serialised.
/// </summary>
[JsonConverter(typeof(VectorOrRowsConverter))]
public sealed record VectorOrRows(double[][] Rows, bool IsVector);

/// <summary>Reads and writes <see cref="VectorOrRows"/> as a JSON array of numbers or an array of arrays.</summary>
public sealed class VectorOrRowsConverter : JsonConverter<VectorOrRows>
{
    public override VectorOrRows Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options)
    {
        using var document = JsonDocument.ParseValue(ref reader);
        var root = document.RootElement;
        if (root.ValueKind != JsonValueKind.Array)
        {
            throw new JsonFieldException("must be an array of numbers, or an array of rows");
        }

        bool rows = root.GetArrayLength() > 0 && root[0].ValueKind == JsonValueKind.Array;
        return rows
            ? new VectorOrRows(root.EnumerateArray().Select((row, k) => Numbers(row, $"[{k}]")).ToArray(), false)
            : new VectorOrRows([Numbers(root, "")], true);
    }

    public override void Write(Utf8JsonWriter writer, VectorOrRows value, JsonSerializerOptions options)
    {
        if (value.IsVector && value.Rows.Length == 1)
        {
            WriteNumbers(writer, value.Rows[0]);
            return;
        }

        writer.WriteStartArray();
        foreach (var row in value.Rows)
        {
            WriteNumbers(writer, row);
        }

        writer.WriteEndArray();
    }

    /// <summary>
    /// The row's numbers. A number beyond double (1e400) reads as infinite and is refused at its own path, like every
    /// other vector; JsonElement.GetDouble would throw a FormatException the serializer does not translate.
    /// </summary>
    private static double[] Numbers(JsonElement array, string path)
    {
        if (array.ValueKind != JsonValueKind.Array)
        {
            throw new JsonFieldException("each row must be an array of numbers", path);
        }

        var values = new double[array.GetArrayLength()];
        int i = 0;
        foreach (var value in array.EnumerateArray())
        {
            if (value.ValueKind != JsonValueKind.Number || !value.TryGetDouble(out values[i]) || !double.IsFinite(values[i]))
            {
                throw new JsonFieldException("must be a finite number", $"{path}[{i}]");
            }

            i++;
        }

        return values;
    }

    private static void WriteNumbers(Utf8JsonWriter writer, double[] values)
    {
        writer.WriteStartArray();
        foreach (double v in values)
        {
            writer.WriteNumberValue(v);
        }

        writer.WriteEndArray();
    }
}
