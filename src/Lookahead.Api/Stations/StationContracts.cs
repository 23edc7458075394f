using Lookahead.Api.Estimation;
using Lookahead.Api.Http;

namespace Lookahead.Api.Stations;

/// <summary>Body of PUT /v1/stations/{name}: the model the station runs, as a model id or an alias name.</summary>
public sealed record StationRequest(string? Model);

/// <summary>A station: its binding, its counters and the state it carries between steps.</summary>
/// <param name="Model">The model as given when the station was bound (an id or an alias name).</param>
/// <param name="ModelId">The model the station steps with (what <paramref name="Model"/> resolved to when it was bound).</param>
/// <param name="Sequence">The sequence the next step must carry.</param>
/// <param name="Estimate">The estimate after the last step; absent before the first.</param>
/// <param name="LastAppliedInput">The input the last step took as applied.</param>
/// <param name="LastSuggestedMove">The first move the last step suggested (absent after a track step).</param>
public sealed record StationResponse(
    string Name,
    string Model,
    string ModelId,
    long Sequence,
    long StepCount,
    StateEstimateDto? Estimate,
    double[]? LastAppliedInput,
    double[]? LastSuggestedMove,
    DateTimeOffset UpdatedAt);

/// <summary>One page of GET /v1/stations, in name order.</summary>
public sealed record StationPage(IReadOnlyList<StationResponse> Items, int Offset, int Limit, long Total);

/// <summary>
/// Body of POST /v1/stations/{name}/step: the station's current sequence, the measurement now (null when the reading is
/// missing), the input the plant received since the last step (absent: the last suggested move, or at the first step
/// the operating-point input), the setpoint (p), the measured disturbances (q, for the estimate of this sample and held
/// over the horizon) and the mode ("auto", the default: estimate and plan; "track": the operator drives the plant,
/// estimate only).
/// </summary>
public sealed record StationStepRequest(long? Sequence, double[]? Measurement, double[]? AppliedInput, double[]? Reference, double[]? Disturbance, string? Mode);

/// <summary>The answer of a step: the station's new sequence, the estimate now, the move to apply (auto mode) and the plan's status.</summary>
/// <param name="Status">The plan's status (optimal, iteration-limit, infeasible), or "tracking" in track mode.</param>
public sealed record StationStepResponse(
    long Sequence,
    StateEstimateDto Estimate,
    double[]? FirstMove,
    string Status,
    IReadOnlyList<WarningDto> Warnings);
