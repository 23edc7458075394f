using System.Diagnostics;
using Lookahead.Api.Contracts;
using Lookahead.Api.Observability;
using Lookahead.Api.Problems;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;
using Prometheus;

namespace Lookahead.Api.Plans;

/// <summary>Runs one plan: checks the request against the model, solves, and measures the solve alone.</summary>
public sealed class PlanExecutor(LookaheadMetrics metrics)
{
    private readonly Histogram.Child singleDuration = metrics.PlanDuration.WithLabels("plan");

    public PlanExecution Execute(CompiledModel model, PlanRequestDto dto)
    {
        var request = new PlanRequest(dto.State!, dto.Reference, dto.PreviousInput);
        var errors = model.ValidateRequest(request);
        if (errors.Count > 0)
        {
            return new PlanExecution(null, 0, errors.Select(ApiProblems.ToProblemError).ToList());
        }

        long started = Stopwatch.GetTimestamp();
        Plan plan;
        try
        {
            plan = model.Plan(request);
        }
        catch (ModelValidationException ex)
        {
            return new PlanExecution(null, 0, ex.Errors.Select(ApiProblems.ToProblemError).ToList());
        }

        var elapsed = Stopwatch.GetElapsedTime(started);
        singleDuration.Observe(elapsed.TotalSeconds);
        metrics.Plans.WithLabels("plan", Mapping.PlanMapper.StatusName(plan.Status)).Inc();
        return new PlanExecution(plan, elapsed.TotalMicroseconds, []);
    }
}

/// <summary>A plan and its solve time, or the request's field errors.</summary>
public sealed record PlanExecution(Plan? Plan, double SolveMicroseconds, IReadOnlyList<ProblemError> Errors);
