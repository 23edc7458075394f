using System.Text.Json;
using System.Text.Json.Serialization;
using Lookahead.Api.Contracts;

namespace Lookahead.Api.Json;

/// <summary>Writes <see cref="TrajectoryRows"/> as an array of rows with compact numbers; reads it back (clients, tests).</summary>
internal sealed class TrajectoryRowsConverter : JsonConverter<TrajectoryRows>
{
    public override TrajectoryRows Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options)
    {
        var rows = BoundedArrayReader.ReadMatrix(ref reader, ApiJson.MaxArrayLength(options));
        int columns = rows.Length == 0 ? 0 : rows[0].Length;
        if (rows.Any(r => r.Length != columns))
        {
            throw new JsonException("trajectory rows must all have the same length");
        }

        return new TrajectoryRows(rows.SelectMany(r => r).ToArray(), columns);
    }

    public override void Write(Utf8JsonWriter writer, TrajectoryRows value, JsonSerializerOptions options)
    {
        Span<byte> buffer = stackalloc byte[CompactNumber.MaxLength];
        writer.WriteStartArray();
        for (int r = 0; r < value.RowCount; r++)
        {
            writer.WriteStartArray();
            foreach (double v in value.Row(r))
            {
                int length = CompactNumber.Format(v, buffer);
                writer.WriteRawValue(buffer[..length], skipInputValidation: true);
            }

            writer.WriteEndArray();
        }

        writer.WriteEndArray();
    }
}
