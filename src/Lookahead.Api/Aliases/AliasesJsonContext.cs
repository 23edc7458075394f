using System.Text.Json.Serialization;

namespace Lookahead.Api.Aliases;

/// <summary>Source-generated JSON metadata for alias requests and responses; registered first in the resolver chain by this room.</summary>
[JsonSourceGenerationOptions(
    PropertyNamingPolicy = JsonKnownNamingPolicy.CamelCase,
    DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull,
    UnmappedMemberHandling = JsonUnmappedMemberHandling.Disallow)]
[JsonSerializable(typeof(AliasRequest))]
[JsonSerializable(typeof(AliasResponse))]
public sealed partial class AliasesJsonContext : JsonSerializerContext;
