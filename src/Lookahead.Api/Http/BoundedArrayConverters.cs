using System.Text.Json;
using System.Text.Json.Serialization;

namespace Lookahead.Api.Http;

/// <summary>double[] with a length bound; registered on the options so every numeric vector in every DTO is bounded.</summary>
internal sealed class BoundedVectorConverter(int maxLength) : JsonConverter<double[]>
{
    public int MaxLength => maxLength;

    public override double[] Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options) =>
        BoundedArrayReader.ReadVector(ref reader, maxLength);

    public override void Write(Utf8JsonWriter writer, double[] value, JsonSerializerOptions options) =>
        BoundedArrayReader.WriteVector(writer, value);
}

/// <summary>double?[] (limits with unbounded entries) with a length bound.</summary>
internal sealed class BoundedNullableVectorConverter(int maxLength) : JsonConverter<double?[]>
{
    public override double?[] Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options) =>
        BoundedArrayReader.ReadNullableVector(ref reader, maxLength);

    public override void Write(Utf8JsonWriter writer, double?[] value, JsonSerializerOptions options)
    {
        writer.WriteStartArray();
        foreach (var v in value)
        {
            if (v is double d)
            {
                writer.WriteNumberValue(d);
            }
            else
            {
                writer.WriteNullValue();
            }
        }

        writer.WriteEndArray();
    }
}

/// <summary>double[][] (matrices, trajectories) with a bound on rows and on row length.</summary>
internal sealed class BoundedMatrixConverter(int maxLength) : JsonConverter<double[][]>
{
    public override double[][] Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options) =>
        BoundedArrayReader.ReadMatrix(ref reader, maxLength);

    public override void Write(Utf8JsonWriter writer, double[][] value, JsonSerializerOptions options) =>
        BoundedArrayReader.WriteMatrix(writer, value);
}
