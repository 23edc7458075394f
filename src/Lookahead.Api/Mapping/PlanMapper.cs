using Lookahead.Api.Contracts;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Mapping;

/// <summary>Core plans to wire records, and the wire names of statuses and limit kinds.</summary>
public static class PlanMapper
{
    public static PlanResponse ToResponse(string modelId, string? alias, Plan plan, double solveMicroseconds) => new(
        modelId,
        alias,
        StatusName(plan.Status),
        new TrajectoryRows(plan.Inputs, plan.InputCount),
        new TrajectoryRows(plan.States, plan.StateCount),
        new TrajectoryRows(plan.Outputs, plan.OutputCount),
        plan.Cost,
        ToTarget(plan.Target),
        ToActiveLimits(plan.ActiveLimits),
        plan.Iterations,
        plan.MaxOutputViolation,
        Warnings(plan),
        solveMicroseconds);

    public static TargetDto? ToTarget(SteadyStateTarget? target) =>
        target is null ? null : new TargetDto(target.State, target.Input, target.Output, target.ReferenceReached, target.LimitedByInputLimits);

    public static IReadOnlyList<ActiveLimitDto> ToActiveLimits(IReadOnlyList<ActiveLimit> limits)
    {
        if (limits.Count == 0)
        {
            return [];
        }

        var result = new ActiveLimitDto[limits.Count];
        for (int i = 0; i < result.Length; i++)
        {
            result[i] = new ActiveLimitDto(LimitKindName(limits[i].Kind), limits[i].Step, limits[i].Index);
        }

        return result;
    }

    /// <summary>The core's warnings, plus one of ours whenever the status is not a clean optimum and the core said nothing.</summary>
    public static IReadOnlyList<string> Warnings(Plan plan)
    {
        if (plan.Status == PlanStatus.Optimal || plan.Warnings.Count > 0)
        {
            return plan.Warnings;
        }

        return [StatusWarning(plan.Status)];
    }

    public static string StatusWarning(PlanStatus status) => status switch
    {
        PlanStatus.IterationLimit => "the solver stopped at its iteration limit: the plan is feasible for the input limits but not proven optimal",
        PlanStatus.Infeasible => "the hard limits cannot all be met: the inputs are a best-effort projection and must not be applied blindly",
        _ => "the plan is not a clean optimum",
    };

    public static string StatusName(PlanStatus status) => status switch
    {
        PlanStatus.Optimal => "optimal",
        PlanStatus.IterationLimit => "iteration-limit",
        PlanStatus.Infeasible => "infeasible",
        _ => status.ToString().ToLowerInvariant(),
    };

    public static string LimitKindName(LimitKind kind) => kind switch
    {
        LimitKind.InputMin => "input-min",
        LimitKind.InputMax => "input-max",
        LimitKind.InputRateMin => "input-rate-min",
        LimitKind.InputRateMax => "input-rate-max",
        LimitKind.OutputMin => "output-min",
        LimitKind.OutputMax => "output-max",
        _ => kind.ToString().ToLowerInvariant(),
    };
}
