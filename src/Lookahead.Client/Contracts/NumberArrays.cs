using System.Text.Json;

namespace Lookahead.Client;

/// <summary>Reading and writing the two array shapes the unions share: numbers, or rows of numbers.</summary>
internal static class NumberArrays
{
    public static (double[][] Rows, bool IsVector) Read(ref Utf8JsonReader reader)
    {
        if (reader.TokenType != JsonTokenType.StartArray)
        {
            throw new JsonException("expected an array of numbers or an array of rows");
        }

        var values = new List<double>();
        var rows = new List<double[]>();
        bool? nested = null;
        while (reader.Read() && reader.TokenType != JsonTokenType.EndArray)
        {
            if (reader.TokenType == JsonTokenType.StartArray && nested != false)
            {
                nested = true;
                rows.Add(ReadNumbers(ref reader));
            }
            else if (reader.TokenType == JsonTokenType.Number && nested != true)
            {
                nested = false;
                values.Add(reader.GetDouble());
            }
            else
            {
                throw new JsonException("an array mixes numbers and rows, or holds something else");
            }
        }

        return nested == true ? (rows.ToArray(), false) : ([values.ToArray()], true);
    }

    private static double[] ReadNumbers(ref Utf8JsonReader reader)
    {
        var values = new List<double>();
        while (reader.Read() && reader.TokenType != JsonTokenType.EndArray)
        {
            if (reader.TokenType != JsonTokenType.Number)
            {
                throw new JsonException("a row must hold numbers only");
            }

            values.Add(reader.GetDouble());
        }

        return values.ToArray();
    }

    public static void WriteVector(Utf8JsonWriter writer, double[] values)
    {
        writer.WriteStartArray();
        foreach (double v in values)
        {
            writer.WriteNumberValue(v);
        }

        writer.WriteEndArray();
    }

    public static void WriteRows(Utf8JsonWriter writer, double[][] rows)
    {
        writer.WriteStartArray();
        foreach (var row in rows)
        {
            WriteVector(writer, row);
        }

        writer.WriteEndArray();
    }
}
