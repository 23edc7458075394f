using System.Text.Json.Serialization;

namespace Lookahead.Api.Simulation;

/// <summary>Source-generated JSON metadata for simulation requests and responses; registered first in the resolver chain by this room.</summary>
[JsonSourceGenerationOptions(
    PropertyNamingPolicy = JsonKnownNamingPolicy.CamelCase,
    DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull,
    UnmappedMemberHandling = JsonUnmappedMemberHandling.Disallow)]
[JsonSerializable(typeof(SimulationRequestDto))]
[JsonSerializable(typeof(SimulationResponse))]
public sealed partial class SimulationJsonContext : JsonSerializerContext;
