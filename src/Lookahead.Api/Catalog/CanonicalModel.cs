using System.Text.Json;
using System.Text.Json.Serialization.Metadata;
using Lookahead.Core.Models;

namespace Lookahead.Api.Catalog;

/// <summary>A validated document in canonical form, its id, and the core document parsed back from that form.</summary>
public sealed record CanonicalModel(string Id, byte[] Json, ModelDocumentDto Dto, ModelDocument Document)
{
    /// <summary>Builds the canonical form of an already validated, normalised document.</summary>
    public static CanonicalModel From(ModelDocumentDto normalised, JsonSerializerOptions options)
    {
        var typeInfo = (JsonTypeInfo<ModelDocumentDto>)options.GetTypeInfo(typeof(ModelDocumentDto));
        var json = CanonicalJson.Write(JsonSerializer.SerializeToElement(normalised, typeInfo));
        return Parse(json, options);
    }

    /// <summary>
    /// Reads a canonical document (from the store, or just written). Compiling what this returns, rather than the
    /// client's text, is what makes a recompilation after a restart exact.
    /// </summary>
    public static CanonicalModel Parse(byte[] json, JsonSerializerOptions options)
    {
        var typeInfo = (JsonTypeInfo<ModelDocumentDto>)options.GetTypeInfo(typeof(ModelDocumentDto));
        var dto = JsonSerializer.Deserialize(json, typeInfo) ?? throw new JsonException("stored model document is empty");
        var errors = new List<Lookahead.Core.Validation.ValidationError>();
        var document = ModelDocumentMapping.ToCore(dto, errors);
        if (errors.Count > 0)
        {
            throw new InvalidOperationException($"stored model document does not map: {errors[0].Path}: {errors[0].Reason}");
        }

        return new CanonicalModel(ModelId.FromCanonical(json), json, dto, document);
    }
}
