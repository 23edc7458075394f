using Lookahead.Api.Http;

namespace Lookahead.Api.Plans;

/// <summary>
/// The optimal input sequence and its predicted trajectory. Anything but status "optimal" comes with a warning code.
/// <see cref="Cost"/> is J as defined for the model; when a soft output limit cannot be met, the violation is in
/// <see cref="MaxOutputViolation"/> and the internal penalty that traded it off in <see cref="SoftLimitPenalty"/>.
/// </summary>
public sealed record PlanResponse(
    string ModelId,
    string? Alias,
    string Status,
    TrajectoryRows Inputs,
    TrajectoryRows States,
    TrajectoryRows Outputs,
    double Cost,
    TargetDto? Target,
    IReadOnlyList<ActiveLimitDto> ActiveLimits,
    int Iterations,
    double MaxOutputViolation,
    double SoftLimitPenalty,
    IReadOnlyList<WarningDto> Warnings,
    double SolveMicroseconds);

/// <summary>The equilibrium the plan steers to when a reference was given.</summary>
public sealed record TargetDto(double[] State, double[] Input, double[] Output, bool ReferenceReached, bool LimitedByInputLimits);

/// <summary>A limit the plan presses against: kind (input-min, input-max, input-rate-min, input-rate-max, output-min, output-max), step and index.</summary>
public sealed record ActiveLimitDto(string Kind, int Step, int Index);
