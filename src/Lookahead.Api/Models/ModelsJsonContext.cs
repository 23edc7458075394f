using System.Text.Json.Serialization;

namespace Lookahead.Api.Models;

/// <summary>Source-generated JSON metadata for model responses; registered first in the resolver chain by this room.</summary>
[JsonSourceGenerationOptions(
    PropertyNamingPolicy = JsonKnownNamingPolicy.CamelCase,
    DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull,
    UnmappedMemberHandling = JsonUnmappedMemberHandling.Disallow)]
[JsonSerializable(typeof(ModelRegistrationResponse))]
[JsonSerializable(typeof(ModelDetailsResponse))]
[JsonSerializable(typeof(ModelPage))]
[JsonSerializable(typeof(GainResponse))]
public sealed partial class ModelsJsonContext : JsonSerializerContext;
