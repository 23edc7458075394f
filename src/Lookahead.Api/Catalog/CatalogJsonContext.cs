using System.Text.Json.Serialization;

namespace Lookahead.Api.Catalog;

/// <summary>Source-generated JSON metadata for the model document; registered first in the resolver chain by this room.</summary>
[JsonSourceGenerationOptions(
    PropertyNamingPolicy = JsonKnownNamingPolicy.CamelCase,
    DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull,
    UnmappedMemberHandling = JsonUnmappedMemberHandling.Disallow)]
[JsonSerializable(typeof(ModelDocumentDto))]
public sealed partial class CatalogJsonContext : JsonSerializerContext;
