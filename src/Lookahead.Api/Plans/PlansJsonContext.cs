using System.Text.Json.Serialization;

namespace Lookahead.Api.Plans;

/// <summary>Source-generated JSON metadata for plan requests and responses; registered first in the resolver chain by this room.</summary>
[JsonSourceGenerationOptions(
    PropertyNamingPolicy = JsonKnownNamingPolicy.CamelCase,
    DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull,
    UnmappedMemberHandling = JsonUnmappedMemberHandling.Disallow)]
[JsonSerializable(typeof(PlanRequestDto))]
[JsonSerializable(typeof(PlanResponse))]
public sealed partial class PlansJsonContext : JsonSerializerContext;
