using System.Text.Json;
using System.Text.Json.Serialization;
using Lookahead.Api.Http;

namespace Lookahead.Api.Catalog;

/// <summary>A terminal weight is the string "riccati" or "stage", or an explicit matrix.</summary>
public sealed class TerminalWeightJsonConverter : JsonConverter<TerminalWeightDto>
{
    public override TerminalWeightDto Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options)
    {
        if (reader.TokenType == JsonTokenType.String)
        {
            return new TerminalWeightDto(reader.GetString(), null);
        }

        if (reader.TokenType == JsonTokenType.StartArray)
        {
            return new TerminalWeightDto(null, BoundedArrayReader.ReadMatrix(ref reader, ApiJson.MaxArrayLength(options)));
        }

        throw new JsonFieldException("must be 'riccati', 'stage' or an n×n matrix");
    }

    public override void Write(Utf8JsonWriter writer, TerminalWeightDto value, JsonSerializerOptions options)
    {
        if (value.Matrix is { } matrix)
        {
            BoundedArrayReader.WriteMatrix(writer, matrix);
        }
        else
        {
            writer.WriteStringValue(value.Kind);
        }
    }
}
