using Lookahead.Api.Catalog;
using Lookahead.Api.Charts;
using Lookahead.Api.Configuration;
using Lookahead.Api.Contracts;
using Lookahead.Api.Json;
using Lookahead.Api.Mapping;
using Lookahead.Api.Plans;
using Lookahead.Api.Problems;
using Lookahead.Core.Planning;
using Microsoft.AspNetCore.Http.HttpResults;
using Serilog;

namespace Lookahead.Api.Endpoints;

/// <summary>One plan for one measured state: the hot path stations call every sample.</summary>
public static class PlansEndpoints
{
    public static RouteGroupBuilder MapPlansEndpoints(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/v1/models").WithTags("Plans").RequireRateLimiting(RateLimitingOptions.PolicyName);

        group.MapPost("/{id}/plan", PlanAsync)
            .WithName("PlanForModel")
            .WithSummary("Optimal input sequence and predicted trajectory for a measured state (?format=svg for a chart)")
            .Accepts<PlanRequestDto>("application/json")
            .WithMetadata(new Composition.SvgAlternativeMetadata())
            .ProducesBodyProblemsForModel();

        return group;
    }

    public static async Task<Results<Ok<PlanResponse>, ContentHttpResult, ProblemHttpResult>> PlanAsync(
        string id,
        HttpRequest request,
        RequestBodyReader reader,
        ModelCatalog catalog,
        PlanExecutor executor,
        IDiagnosticContext log,
        CancellationToken cancellationToken,
        string? format = null)
    {
        if (!ResponseFormats.TryParse(format, out var responseFormat, out var formatProblem))
        {
            return formatProblem!;
        }

        var (model, problem) = await ModelLookup.FindAsync(id, catalog);
        if (problem is not null)
        {
            return problem;
        }

        return await RespondAsync(id, null, model!, responseFormat, request, reader, executor, log, cancellationToken);
    }

    /// <summary>Shared with the alias route: read the body, plan, answer as JSON or SVG.</summary>
    internal static async Task<Results<Ok<PlanResponse>, ContentHttpResult, ProblemHttpResult>> RespondAsync(
        string id,
        string? alias,
        CompiledModel model,
        ResponseFormat format,
        HttpRequest request,
        RequestBodyReader reader,
        PlanExecutor executor,
        IDiagnosticContext log,
        CancellationToken cancellationToken)
    {
        var body = await reader.ReadJsonAsync<PlanRequestDto>(request, cancellationToken);
        if (body.Problem is not null)
        {
            return body.Problem;
        }

        var execution = executor.Execute(model, body.Value!);
        log.Set("ModelId", id);
        if (execution.Plan is not { } plan)
        {
            return ApiProblems.Validation(execution.Errors);
        }

        log.Set("PlanStatus", PlanMapper.StatusName(plan.Status));
        log.Set("SolveMicroseconds", Math.Round(execution.SolveMicroseconds, 1));
        if (format == ResponseFormat.Svg)
        {
            var outputs = Rows.Split(plan.Outputs, plan.OutputCount);
            var inputs = Rows.Split(plan.Inputs, plan.InputCount);
            var references = body.Value!.Reference is { } r ? Enumerable.Repeat(r, plan.Horizon).ToArray() : null;
            var chart = TrajectoryChart.Build($"Plan for {model.Document.Name ?? id[..12]} ({PlanMapper.StatusName(plan.Status)})", model, outputs, inputs, references);
            return TypedResults.Text(SvgChartWriter.Write(chart), ResponseFormats.SvgContentType);
        }

        return TypedResults.Ok(PlanMapper.ToResponse(id, alias, plan, execution.SolveMicroseconds));
    }
}
