using Lookahead.Core.Planning;

namespace Lookahead.Api.Http;

/// <summary>The wire names of the core's closed sets: plan statuses, limit kinds and warning codes.</summary>
public static class WireNames
{
    public static string Status(PlanStatus status) => status switch
    {
        PlanStatus.Optimal => "optimal",
        PlanStatus.IterationLimit => "iteration-limit",
        PlanStatus.Infeasible => "infeasible",
        _ => throw new ArgumentOutOfRangeException(nameof(status), status, "no wire name"),
    };

    public static string Limit(LimitKind kind) => kind switch
    {
        LimitKind.InputMin => "input-min",
        LimitKind.InputMax => "input-max",
        LimitKind.InputRateMin => "input-rate-min",
        LimitKind.InputRateMax => "input-rate-max",
        LimitKind.OutputMin => "output-min",
        LimitKind.OutputMax => "output-max",
        _ => throw new ArgumentOutOfRangeException(nameof(kind), kind, "no wire name"),
    };

    public static string Warning(WarningCode code) => code switch
    {
        WarningCode.SetpointUnreachable => "setpoint-unreachable",
        WarningCode.SetpointOutsideInputLimits => "setpoint-outside-input-limits",
        WarningCode.FirstMoveRateRelaxed => "first-move-rate-relaxed",
        WarningCode.IterationLimit => "iteration-limit",
        WarningCode.LimitsContradict => "limits-contradict",
        WarningCode.SoftOutputLimitExceeded => "soft-output-limit-exceeded",
        WarningCode.StepsNotOptimal => "steps-not-optimal",
        WarningCode.ClosedLoopUnstable => "closed-loop-unstable",
        WarningCode.NotStabilisable => "not-stabilisable",
        WarningCode.NotControllable => "not-controllable",
        WarningCode.ModeUnseenByCost => "mode-unseen-by-cost",
        WarningCode.HessianIllConditioned => "hessian-ill-conditioned",
        WarningCode.DisturbanceNotBalanced => "disturbance-not-balanced",
        WarningCode.DisturbanceTargetOutsideInputLimits => "disturbance-target-outside-input-limits",
        WarningCode.MeasurementMissing => "measurement-missing",
        WarningCode.EstimateInitialised => "estimate-initialised",
        WarningCode.AppliedInputAssumed => "applied-input-assumed",
        WarningCode.AppliedInputFromOperatingPoint => "applied-input-from-operating-point",
        WarningCode.SamplesMissed => "samples-missed",
        WarningCode.StationRestartedAfterGap => "station-restarted-after-gap",
        WarningCode.ModelChangedEstimateKept => "model-changed-estimate-kept",
        WarningCode.ModelChangedEstimateRestarted => "model-changed-estimate-restarted",
        WarningCode.AliasGoneModelKept => "alias-gone-model-kept",
        _ => throw new ArgumentOutOfRangeException(nameof(code), code, "no wire name"),
    };
}
