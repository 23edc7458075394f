using System.Text.Json.Serialization;

namespace Lookahead.Api.Http;

/// <summary>Source-generated JSON metadata for problem documents and warnings; registered first in the resolver chain by this room.</summary>
[JsonSourceGenerationOptions(
    PropertyNamingPolicy = JsonKnownNamingPolicy.CamelCase,
    DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull,
    UnmappedMemberHandling = JsonUnmappedMemberHandling.Disallow)]
[JsonSerializable(typeof(List<ProblemError>))]
[JsonSerializable(typeof(WarningDto))]
public sealed partial class HttpJsonContext : JsonSerializerContext;
