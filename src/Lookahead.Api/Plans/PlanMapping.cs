using Lookahead.Api.Http;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Plans;

/// <summary>Core plans to wire records.</summary>
public static class PlanMapping
{
    public static PlanResponse ToResponse(string modelId, string? alias, Plan plan, double solveMicroseconds) => new(
        modelId,
        alias,
        WireNames.Status(plan.Status),
        new TrajectoryRows(plan.Inputs, plan.InputCount),
        new TrajectoryRows(plan.States, plan.StateCount),
        new TrajectoryRows(plan.Outputs, plan.OutputCount),
        plan.Cost,
        ToTarget(plan.Target),
        ToActiveLimits(plan.ActiveLimits),
        plan.Iterations,
        plan.MaxOutputViolation,
        plan.SoftLimitPenalty,
        WarningText.ToDtos(plan.Warnings),
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
            result[i] = new ActiveLimitDto(WireNames.Limit(limits[i].Kind), limits[i].Step, limits[i].Index);
        }

        return result;
    }
}
