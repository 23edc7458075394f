using System.Collections.Concurrent;
using System.Text.Json;
using Lookahead.Api.Catalog;
using Lookahead.Api.Configuration;
using Lookahead.Api.Contracts;
using Lookahead.Api.Json;
using Lookahead.Api.Mapping;
using Lookahead.Api.Plans;
using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Endpoints;

/// <summary>
/// A bare endpoint for load tests: same pipeline, same request and same-size answer as a plan, but the answer is
/// computed once and then replayed, so the difference in throughput is what planning itself costs.
/// Mapped only when Diagnostics:EnableBareEndpoint is true, and never in the OpenAPI document.
/// </summary>
public static class DiagnosticsEndpoints
{
    private static readonly ConcurrentDictionary<string, byte[]> Bodies = new(StringComparer.Ordinal);

    public static RouteGroupBuilder MapDiagnosticsEndpoints(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/v1").WithTags("Diagnostics").RequireRateLimiting(RateLimitingOptions.PolicyName).ExcludeFromDescription();
        group.MapPost("/echo-plan-shaped/{id}", EchoAsync)
            .WithName("EchoPlanShaped")
            .WithSummary("Load-test baseline: a precomputed plan-sized answer");
        return group;
    }

    public static async Task<Results<FileContentHttpResult, Microsoft.AspNetCore.Http.HttpResults.ProblemHttpResult>> EchoAsync(
        string id, HttpRequest request, RequestBodyReader reader, ModelCatalog catalog, PlanExecutor executor, CancellationToken cancellationToken)
    {
        var body = await reader.ReadJsonAsync<PlanRequestDto>(request, cancellationToken);
        if (body.Problem is not null)
        {
            return body.Problem;
        }

        if (!Bodies.TryGetValue(id, out var bytes))
        {
            var (model, problem) = await ModelLookup.FindAsync(id, catalog);
            if (problem is not null)
            {
                return problem;
            }

            var execution = executor.Execute(model!, body.Value!);
            if (execution.Plan is null)
            {
                return Problems.ApiProblems.Validation(execution.Errors);
            }

            var response = PlanMapper.ToResponse(id, null, execution.Plan, execution.SolveMicroseconds);
            bytes = JsonSerializer.SerializeToUtf8Bytes(response, ApiJsonContext.Default.PlanResponse);
            Bodies[id] = bytes;
        }

        return TypedResults.File(bytes, "application/json; charset=utf-8");
    }
}
