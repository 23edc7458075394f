using Lookahead.Api.Access;
using System.IO.Pipelines;
using Lookahead.Api.Http;
using Lookahead.Api.Models;
using Microsoft.AspNetCore.Http.Features;
using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Replay;

/// <summary>
/// Replay for historians: many states in, one result per state out, streamed in both directions, as JSON,
/// NDJSON or CSV (chosen by Content-Type; the answer has the same type). For a model with an estimator the rows may
/// carry measurements and applied inputs instead: the estimator then runs through them in order.
/// </summary>
public static class ReplayApi
{
    public const string NdjsonContentType = "application/x-ndjson";
    public const string CsvContentType = "text/csv";
    public const string JsonContentType = "application/json";

    public static IServiceCollection AddReplay(this IServiceCollection services)
    {
        services.AddOptions<ReplayOptions>().BindConfiguration(ReplayOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        services.AddSingleton<ReplayMetrics>();
        services.AddSingleton<ReplayRunner>();
        services.ConfigureSwaggerGen(o =>
        {
            string[] details = [ReplayDetails.Name(ReplayDetail.FirstMove), ReplayDetails.Name(ReplayDetail.Full)];
            o.RequireMembers<ReplayRequest>("requests");
            o.CloseSet<ReplayRequest>("detail", details);
            o.CloseSet<ReplayResponse>("detail", details);
            o.CloseSet<ReplayResponse>("reason", [ReplaySummary.ShutdownReason]);
            o.CloseSet<ReplayRowResult>("status", WarningCodes.PlanStatuses.Append("error"));
            o.CloseQuerySet("ReplayPlans", "detail", details);
            o.OperationFilter<ReplayMediaTypesOperationFilter>();
        });
        return services;
    }

    public static RouteGroupBuilder MapReplayApi(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/v1/models").WithTags("Replay").RequireRateLimiting(RateLimitPolicy.Name);

        group.MapPost("/{id}/plans", ReplayAsync)
            .IsSolverWork()
            .RequireScope(AccessScopes.PlansRun)
            .WithName("ReplayPlans")
            .WithParameterExample("id", OperationExampleConventions.ExampleModelId)
            .WithRequestExample("""{"detail":"first-move","requests":[{"state":[-17.5,-18.5,-19.5],"previousInput":[30,30,0]},{"state":[-17.7,-18.6,-19.5],"previousInput":[50,50,0]}]}""")
            .WithRequestExample("{\"state\":[-17.5,-18.5,-19.5],\"previousInput\":[30,30,0]}\n{\"state\":[-17.7,-18.6,-19.5],\"previousInput\":[50,50,0]}\n", ReplayApi.NdjsonContentType)
            .WithRequestExample("timestamp,zone_a_temp,zone_b_temp,zone_c_temp,prev_chiller_1,prev_chiller_2,prev_door_fan\n2026-12-01T06:00:00Z,-17.5,-18.5,-19.5,30,30,0\n2026-12-01T06:01:00Z,-17.7,-18.6,-19.5,50,50,0\n", ReplayApi.CsvContentType)
            .WithSummary("Plan every state of a JSON, NDJSON or CSV upload; results stream back in input order")
            .Accepts<ReplayRequest>(JsonContentType, NdjsonContentType, CsvContentType)
            .Produces<ReplayResponse>(StatusCodes.Status200OK, JsonContentType, NdjsonContentType, CsvContentType)
            .ProducesBodyProblemsForModel();

        return group;
    }

    public static async Task<Results<EmptyHttpResult, ProblemHttpResult>> ReplayAsync(
        string id, [AsParameters] ReplayServices services, string? detail = null)
    {
        var (context, catalog, runner, limits, log, cancellationToken) = services;
        var request = context.Request;
        string? format = FormatOf(request.ContentType);
        if (format is null)
        {
            return ApiProblems.UnsupportedMediaType(request.ContentType, JsonContentType, NdjsonContentType, CsvContentType);
        }

        var queryDetail = ReplayDetail.FirstMove;
        if (detail is not null && !ReplayDetails.TryParse(detail, out queryDetail))
        {
            return ApiProblems.Validation("detail", "must be 'first-move' or 'full'");
        }

        long limit = limits.Value.MaxReplayBodyBytes;
        if (request.ContentLength > limit)
        {
            return ApiProblems.PayloadTooLarge(limit);
        }

        var (model, problem) = await ModelLookup.FindAsync(id, request.HttpContext, catalog);
        if (problem is not null)
        {
            return problem;
        }

        // Replay streams, so the server-wide body limit is lifted here and ours is counted as bytes arrive.
        if (context.Features.Get<IHttpMaxRequestBodySizeFeature>() is { IsReadOnly: false } size)
        {
            size.MaxRequestBodySize = limit;
        }

        log.Set("ModelId", id);
        log.Set("ReplayFormat", format);
        var body = new LengthLimitedStream(request.Body, limit);
        int maxRow = limits.Value.MaxReplayRowBytes;
        int maxDepth = limits.Value.MaxJsonDepth;
        var response = context.Response;
        ReplayRun run;
        switch (format)
        {
            case "csv":
            {
                var (source, errors) = await CsvSource.OpenAsync(body, model!, maxRow, cancellationToken);
                if (source is null)
                {
                    return ApiProblems.Validation(errors, "The CSV header does not match the model; no row was processed.");
                }

                await using (source)
                {
                    response.ContentType = CsvContentType + "; charset=utf-8";
                    await using var sink = new CsvSink(response.Body, source.Layout);
                    run = await runner.RunAsync(source, sink, model!, format, cancellationToken);
                }

                break;
            }

            case "ndjson":
            {
                var reader = PipeReader.Create(body);
                response.ContentType = NdjsonContentType;
                var source = new NdjsonSource(reader, maxRow, maxDepth);
                run = await runner.RunAsync(source, new NdjsonSink(response.BodyWriter, queryDetail), model!, format, cancellationToken);
                await reader.CompleteAsync();
                break;
            }

            default:
            {
                var reader = PipeReader.Create(body);
                var source = new JsonRequestsSource(reader, maxRow, maxDepth);
                var error = await source.PrepareAsync(cancellationToken);
                if (error is not null)
                {
                    await reader.CompleteAsync();
                    return error.Reason.StartsWith("is not valid JSON", StringComparison.Ordinal)
                        ? ApiProblems.JsonBody(new JsonErrorDescription(error, null, null))
                        : ApiProblems.Validation([error], "The replay body is not { \"detail\"?, \"requests\": [ … ] }; no row was processed.");
                }

                var chosen = source.Detail is not null && ReplayDetails.TryParse(source.Detail, out var fromBody) ? fromBody : queryDetail;

                response.ContentType = JsonContentType + "; charset=utf-8";
                var sink = new JsonResultsSink(response.BodyWriter, id, () => chosen, () => source.Warnings);
                run = await runner.RunAsync(source, sink, model!, format, cancellationToken);
                await reader.CompleteAsync();
                break;
            }
        }

        if (run.Summary is not { } summary)
        {
            return ApiProblems.Validation(run.Errors, "The first row decides what every row carries (a state, or a measurement with its applied input); no row was processed.");
        }

        log.Set("ReplayRows", summary.Rows);
        log.Set("ReplayFailedRows", summary.FailedRows);
        log.Set("ReplayComplete", summary.Complete);
        return TypedResults.Empty;
    }

    private static string? FormatOf(string? contentType)
    {
        if (contentType is null)
        {
            return null;
        }

        var media = contentType.Split(';', 2)[0].Trim();
        return media.ToLowerInvariant() switch
        {
            JsonContentType => "json",
            NdjsonContentType or "application/ndjson" or "application/jsonl" => "ndjson",
            CsvContentType => "csv",
            _ => null,
        };
    }
}
