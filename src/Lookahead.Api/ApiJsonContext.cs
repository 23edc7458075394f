using System.Text.Json.Serialization;
using Lookahead.Api.Aliases;
using Lookahead.Api.Catalog;
using Lookahead.Api.Estimation;
using Lookahead.Api.Models;
using Lookahead.Api.Plans;
using Lookahead.Api.Simulation;
using Lookahead.Api.Stations;

namespace Lookahead.Api;

/// <summary>
/// Source-generated JSON metadata for every feature's request and response records, first in the resolver chain
/// (registered in Program.cs) so the hot paths do no reflection. It sits beside Program.cs because, like it, it
/// knows every feature; the shared records of Http/ have their own context there.
/// </summary>
[JsonSourceGenerationOptions(
    PropertyNamingPolicy = JsonKnownNamingPolicy.CamelCase,
    DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull,
    UnmappedMemberHandling = JsonUnmappedMemberHandling.Disallow)]
[JsonSerializable(typeof(ModelDocumentDto))]
[JsonSerializable(typeof(ModelRegistrationResponse))]
[JsonSerializable(typeof(ModelDetailsResponse))]
[JsonSerializable(typeof(ModelPage))]
[JsonSerializable(typeof(GainResponse))]
[JsonSerializable(typeof(PlanRequestDto))]
[JsonSerializable(typeof(PlanResponse))]
[JsonSerializable(typeof(AliasRequest))]
[JsonSerializable(typeof(AliasResponse))]
[JsonSerializable(typeof(AliasPage))]
[JsonSerializable(typeof(SimulationRequestDto))]
[JsonSerializable(typeof(SimulationResponse))]
[JsonSerializable(typeof(EstimateRequestDto))]
[JsonSerializable(typeof(EstimateResponse))]
[JsonSerializable(typeof(StateEstimateDto))]
[JsonSerializable(typeof(StationRequest))]
[JsonSerializable(typeof(StationResponse))]
[JsonSerializable(typeof(StationPage))]
[JsonSerializable(typeof(StationStepRequest))]
[JsonSerializable(typeof(StationStepResponse))]
[JsonSerializable(typeof(StationStepHistory))]
public sealed partial class ApiJsonContext : JsonSerializerContext;
