using Lookahead.Api.Access;
using System.Collections.Concurrent;
using System.Text.Json;
using Lookahead.Api.Http;
using Lookahead.Api.Models;
using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Plans;

/// <summary>
/// A bare endpoint for load tests: same pipeline, same request and same-size answer as a plan, but the answer is
/// computed once and then replayed, so the difference in throughput is what planning itself costs.
/// Mapped only when Diagnostics:EnableBareEndpoint is true, and never in the OpenAPI document.
/// </summary>
public static class PlanEchoApi
{
    private static readonly ConcurrentDictionary<string, byte[]> Bodies = new(StringComparer.Ordinal);

    public static RouteGroupBuilder MapPlanEchoApi(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/v1").WithTags("Diagnostics").RequireRateLimiting(RateLimitPolicy.Name).ExcludeFromDescription();
        group.MapPost("/echo-plan-shaped/{id}", EchoAsync)
            .RequireScope(AccessScopes.PlansRun)
            .WithName("EchoPlanShaped")
            .WithSummary("Load-test baseline: a precomputed plan-sized answer");
        return group;
    }

    public static async Task<Results<FileContentHttpResult, ProblemHttpResult>> EchoAsync(string id, [AsParameters] PlanServices services)
    {
        var (model, problem) = await ModelLookup.FindAsync(id, services.Request.HttpContext, services.Catalog);
        if (problem is not null)
        {
            return problem;
        }

        // Read and parse like a plan, so the baseline pays the same per-request costs except the solve.
        var body = await PlansApi.ReadAsync(model!, services);
        if (body.Problem is not null)
        {
            return body.Problem;
        }

        if (!Bodies.TryGetValue(id, out var bytes))
        {
            var call = body.Value!;
            services.Runner.Run(model!, call, PlanDepth.Full, PlanRoute.Plan);
            if (call.Plan is null)
            {
                return ApiProblems.Validation(call.Errors);
            }

            var response = PlanMapping.ToResponse(id, null, call.Plan, call.SolveMicroseconds);
            bytes = JsonSerializer.SerializeToUtf8Bytes(response, services.Reader.SerializerOptions);
            Bodies[id] = bytes;
        }

        return TypedResults.File(bytes, "application/json; charset=utf-8");
    }
}
