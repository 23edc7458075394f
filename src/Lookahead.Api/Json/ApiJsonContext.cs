using System.Text.Json.Serialization;
using Lookahead.Api.Contracts;

namespace Lookahead.Api.Json;

/// <summary>
/// Source-generated metadata for the request and response records, first in the resolver chain so the hot
/// plan path does no reflection.
/// </summary>
[JsonSourceGenerationOptions(
    PropertyNamingPolicy = JsonKnownNamingPolicy.CamelCase,
    DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull,
    UnmappedMemberHandling = JsonUnmappedMemberHandling.Disallow)]
[JsonSerializable(typeof(PlanRequestDto))]
[JsonSerializable(typeof(PlanResponse))]
[JsonSerializable(typeof(ModelDocumentDto))]
[JsonSerializable(typeof(ModelRegistrationResponse))]
[JsonSerializable(typeof(ModelDetailsResponse))]
[JsonSerializable(typeof(ModelPage))]
[JsonSerializable(typeof(GainResponse))]
[JsonSerializable(typeof(AliasRequest))]
[JsonSerializable(typeof(AliasResponse))]
[JsonSerializable(typeof(SimulationRequestDto))]
[JsonSerializable(typeof(SimulationResponse))]
[JsonSerializable(typeof(List<ProblemError>))]
public sealed partial class ApiJsonContext : JsonSerializerContext;
