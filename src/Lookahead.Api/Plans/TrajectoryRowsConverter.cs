using System.Text.Json;
using System.Text.Json.Serialization;
using Lookahead.Api.Http;

namespace Lookahead.Api.Plans;

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
        // The whole trajectory is formatted into one buffer and handed over as a single raw value, so the numbers
        // go through CompactNumber rather than the writer's own round-trip formatting.
        int rows = value.RowCount;
        int size = 2 + (rows * (3 + (value.Columns * (CompactNumber.MaxLength + 1))));
        byte[] buffer = System.Buffers.ArrayPool<byte>.Shared.Rent(size);
        try
        {
            int at = 0;
            buffer[at++] = (byte)'[';
            for (int r = 0; r < rows; r++)
            {
                if (r > 0)
                {
                    buffer[at++] = (byte)',';
                }

                buffer[at++] = (byte)'[';
                var row = value.Row(r);
                for (int c = 0; c < row.Length; c++)
                {
                    if (c > 0)
                    {
                        buffer[at++] = (byte)',';
                    }

                    at += CompactNumber.Format(row[c], buffer.AsSpan(at));
                }

                buffer[at++] = (byte)']';
            }

            buffer[at++] = (byte)']';
            writer.WriteRawValue(buffer.AsSpan(0, at), skipInputValidation: true);
        }
        finally
        {
            System.Buffers.ArrayPool<byte>.Shared.Return(buffer);
        }
    }
}
