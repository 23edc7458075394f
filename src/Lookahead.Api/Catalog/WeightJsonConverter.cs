using System.Text.Json;
using System.Text.Json.Serialization;
using Lookahead.Api.Http;

namespace Lookahead.Api.Catalog;

/// <summary>A weight is a vector (the diagonal) or a matrix; the first token inside the array tells which.</summary>
public sealed class WeightJsonConverter : JsonConverter<WeightDto>
{
    public override WeightDto Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options)
    {
        if (reader.TokenType != JsonTokenType.StartArray)
        {
            throw new JsonFieldException("must be a vector (the diagonal) or a square matrix (an array of rows)");
        }

        var probe = reader;
        probe.Read();
        if (probe.TokenType == JsonTokenType.StartArray)
        {
            return new WeightDto(null, BoundedArrayReader.ReadMatrix(ref reader, ApiJson.MaxArrayLength(options)));
        }

        return new WeightDto(BoundedArrayReader.ReadVector(ref reader, ApiJson.MaxArrayLength(options)), null);
    }

    public override void Write(Utf8JsonWriter writer, WeightDto value, JsonSerializerOptions options)
    {
        if (value.Matrix is { } matrix)
        {
            BoundedArrayReader.WriteMatrix(writer, matrix);
        }
        else
        {
            BoundedArrayReader.WriteVector(writer, value.Diagonal ?? []);
        }
    }
}
