using Lookahead.Api.Estimation;
using Lookahead.Api.Http;
using Lookahead.Api.Plans;

namespace Lookahead.Api.Stations;

/// <summary>
/// Body of PUT /v1/stations/{name}: the model the station runs, as a model id or an alias name (a station bound to an
/// alias follows it when it is re-pointed), and what each step answers with: "first-move" (the default, the move to
/// apply) or "full" (the whole plan as /plan returns it).
/// </summary>
public sealed record StationRequest(string? Model, string? Detail);

/// <summary>A station: its binding, its counters and the state it carries between steps.</summary>
/// <param name="Model">The model as given when the station was bound (an id or an alias name).</param>
/// <param name="ModelId">The model the station steps with: what <paramref name="Model"/> resolved to at the last step (or when bound).</param>
/// <param name="Detail">What a step answers with: first-move or full.</param>
/// <param name="Sequence">The sequence the next step must carry.</param>
/// <param name="Estimate">The estimate after the last step; absent before the first.</param>
/// <param name="LastAppliedInput">The input the last step took as applied.</param>
/// <param name="LastSuggestedMove">The first move the last step suggested (absent after a track step).</param>
/// <param name="LastTimestamp">The plant time the last step gave, if it gave one.</param>
public sealed record StationResponse(
    string Name,
    string Model,
    string ModelId,
    string Detail,
    long Sequence,
    long StepCount,
    StateEstimateDto? Estimate,
    double[]? LastAppliedInput,
    double[]? LastSuggestedMove,
    DateTimeOffset? LastTimestamp,
    DateTimeOffset UpdatedAt);

/// <summary>One page of GET /v1/stations, in name order.</summary>
public sealed record StationPage(IReadOnlyList<StationResponse> Items, int Offset, int Limit, long Total);

/// <summary>
/// Body of POST /v1/stations/{name}/step: the station's current sequence, the measurement now (null when the reading is
/// missing), the input the plant received since the last step (absent: the last suggested move, or at the first step
/// the operating-point input), the setpoint (p values, or a schedule of 1…N rows), the measured disturbances (q values
/// or a forecast of 1…N rows; the first is this sample's, for the estimate), the plant time of the measurement (ISO
/// 8601; a gap of more than 1.5 sample times since the last step is bridged) and the mode ("auto", the default:
/// estimate and plan; "track": the operator drives the plant, estimate only).
/// </summary>
public sealed record StationStepRequest(
    long? Sequence,
    double[]? Measurement,
    double[]? AppliedInput,
    VectorOrRows? Reference,
    VectorOrRows? Disturbance,
    DateTimeOffset? Timestamp,
    string? Mode);

/// <summary>The answer of a step: the station's new sequence, the estimate now, the move to apply (auto mode) and the plan's status.</summary>
/// <param name="ModelId">The model this step used (it changes when the station's alias was re-pointed).</param>
/// <param name="AppliedInput">The input this step took as applied (given, or assumed: a warning says which).</param>
/// <param name="FirstMove">The move to apply now; absent in track mode.</param>
/// <param name="Plan">The whole plan, for a station whose detail is "full"; absent in track mode.</param>
/// <param name="Status">The plan's status (optimal, iteration-limit, infeasible), or "tracking" in track mode.</param>
/// <param name="MissedSamples">Samples bridged since the last step (0 without timestamps).</param>
public sealed record StationStepResponse(
    long Sequence,
    string ModelId,
    StateEstimateDto Estimate,
    double[] AppliedInput,
    double[]? FirstMove,
    PlanResponse? Plan,
    string Status,
    int MissedSamples,
    IReadOnlyList<WarningDto> Warnings);

/// <summary>One step as kept in a station's history: what was asked and what was answered.</summary>
/// <param name="Sequence">The sequence the step carried.</param>
/// <param name="SteppedAt">When the service applied it.</param>
public sealed record StationStepEntry(long Sequence, DateTimeOffset SteppedAt, StationStepRequest Request, StationStepResponse Answer);

/// <summary>GET /v1/stations/{name}/steps: the most recent steps, newest last.</summary>
public sealed record StationStepHistory(string Name, IReadOnlyList<StationStepEntry> Steps);
