using System.Buffers;
using System.Text.Json;

namespace Lookahead.Api.Http;

/// <summary>
/// Reads numeric arrays token by token and refuses to grow past a bound, so an oversized array is rejected
/// while parsing instead of after it has been materialised.
/// </summary>
internal static class BoundedArrayReader
{
    public static double[] ReadVector(ref Utf8JsonReader reader, int maxLength, string prefix = "")
    {
        if (reader.TokenType != JsonTokenType.StartArray)
        {
            throw new JsonFieldException("must be an array of numbers", prefix);
        }

        var rented = ArrayPool<double>.Shared.Rent(16);
        int count = 0;
        try
        {
            while (reader.Read() && reader.TokenType != JsonTokenType.EndArray)
            {
                if (reader.TokenType != JsonTokenType.Number || !reader.TryGetDouble(out double value) || !double.IsFinite(value))
                {
                    throw new JsonFieldException("must be a finite number", $"{prefix}[{count}]");
                }

                if (count == maxLength)
                {
                    throw new JsonFieldException($"has more than {maxLength} entries", prefix);
                }

                if (count == rented.Length)
                {
                    var larger = ArrayPool<double>.Shared.Rent(rented.Length * 2);
                    rented.AsSpan(0, count).CopyTo(larger);
                    ArrayPool<double>.Shared.Return(rented);
                    rented = larger;
                }

                rented[count++] = value;
            }

            return rented.AsSpan(0, count).ToArray();
        }
        finally
        {
            ArrayPool<double>.Shared.Return(rented);
        }
    }

    public static double?[] ReadNullableVector(ref Utf8JsonReader reader, int maxLength)
    {
        if (reader.TokenType != JsonTokenType.StartArray)
        {
            throw new JsonFieldException("must be an array of numbers or nulls");
        }

        var values = new List<double?>();
        while (reader.Read() && reader.TokenType != JsonTokenType.EndArray)
        {
            if (values.Count == maxLength)
            {
                throw new JsonFieldException($"has more than {maxLength} entries");
            }

            if (reader.TokenType == JsonTokenType.Null)
            {
                values.Add(null);
            }
            else if (reader.TokenType == JsonTokenType.Number && reader.TryGetDouble(out double value) && double.IsFinite(value))
            {
                values.Add(value);
            }
            else
            {
                throw new JsonFieldException("must be a finite number or null (unbounded)", $"[{values.Count}]");
            }
        }

        return [.. values];
    }

    public static double[][] ReadMatrix(ref Utf8JsonReader reader, int maxLength)
    {
        if (reader.TokenType != JsonTokenType.StartArray)
        {
            throw new JsonFieldException("must be a matrix: an array of rows, each an array of numbers");
        }

        var rows = new List<double[]>();
        while (reader.Read() && reader.TokenType != JsonTokenType.EndArray)
        {
            if (rows.Count == maxLength)
            {
                throw new JsonFieldException($"has more than {maxLength} rows");
            }

            if (reader.TokenType != JsonTokenType.StartArray)
            {
                throw new JsonFieldException("must be an array of numbers (a matrix row)", $"[{rows.Count}]");
            }

            rows.Add(ReadVector(ref reader, maxLength, $"[{rows.Count}]"));
        }

        return [.. rows];
    }

    public static void WriteVector(Utf8JsonWriter writer, ReadOnlySpan<double> values)
    {
        writer.WriteStartArray();
        foreach (double v in values)
        {
            writer.WriteNumberValue(v);
        }

        writer.WriteEndArray();
    }

    public static void WriteMatrix(Utf8JsonWriter writer, double[][] rows)
    {
        writer.WriteStartArray();
        foreach (var row in rows)
        {
            WriteVector(writer, row);
        }

        writer.WriteEndArray();
    }
}
