using Lookahead.Api.Access;
using Lookahead.Api.Charts;
using Lookahead.Api.Http;
using Lookahead.Api.Models;
using Lookahead.Core.Planning;
using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Plans;

/// <summary>One plan for one measured state: the hot path stations call every sample.</summary>
public static class PlansApi
{
    public static IServiceCollection AddPlans(this IServiceCollection services)
    {
        services.AddOptions<DiagnosticsOptions>().BindConfiguration(DiagnosticsOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        services.AddSingleton<PlanMetrics>();
        services.AddSingleton<PlanRunner>();
        services.ConfigureSwaggerGen(o => o.MapType<TrajectoryRows>(() => new Microsoft.OpenApi.OpenApiSchema
        {
            Description = "Rows of a trajectory (one row per step); numbers carry 15 significant digits.",
            Type = Microsoft.OpenApi.JsonSchemaType.Array,
            Items = OpenApiSchemas.Vector(),
        }));
        services.ConfigureSwaggerGen(o => o.MapType<VectorOrRows>(() => new Microsoft.OpenApi.OpenApiSchema
        {
            Description = "1…N rows (row k for step k, the last row held to the end), or one vector held over the horizon.",

            // Rows first: generators that type a union by its first alternative can then send schedules (one row is a held vector).
            OneOf = [OpenApiSchemas.Matrix(), OpenApiSchemas.Vector()],
        }));
        services.ConfigureSwaggerGen(o =>
        {
            o.CloseSet<PlanResponse>("status", WarningCodes.PlanStatuses);
            o.CloseSet<ActiveLimitDto>("kind", WarningCodes.LimitKinds);
            o.RequireMembers<Estimation.StateEstimateDto>("state");
        });
        return services;
    }

    public static WebApplication MapPlansApi(this WebApplication app)
    {
        var group = app.MapGroup("/v1/models").WithTags("Plans").RequireRateLimiting(RateLimitPolicy.Name);

        group.MapPost("/{id}/plan", PlanAsync)
            .IsSolverWork()
            .RequireScope(AccessScopes.PlansRun)
            .WithName("PlanForModel")
            .WithParameterExample("id", OperationExampleConventions.ExampleModelId)
            .WithRequestExample("""{"state":[-17.5,-18.5,-19.5],"previousInput":[30,30,0],"disturbance":[[18],[19],[20]],"reference":[-20,-20,-20]}""")
            .WithSummary("Optimal input sequence and predicted trajectory for a measured state (?format=svg for a chart, ?format=csv for a table)")
            .Accepts<PlanRequestDto>("application/json")
            .WithMetadata(new SvgAlternativeMetadata(), new CsvAlternativeMetadata())
            .ProducesBodyProblemsForModel();

        if (app.Services.GetRequiredService<Microsoft.Extensions.Options.IOptions<DiagnosticsOptions>>().Value.EnableBareEndpoint)
        {
            app.MapPlanEchoApi();
        }

        return app;
    }

    public static async Task<Results<Ok<PlanResponse>, ContentHttpResult, ProblemHttpResult>> PlanAsync(
        string id, [AsParameters] PlanServices services, string? format = null)
    {
        if (!ResponseFormats.TryParse(format, out var responseFormat, out var formatProblem))
        {
            return formatProblem!;
        }

        var (model, problem) = await ModelLookup.FindAsync(id, services.Request.HttpContext, services.Catalog);
        if (problem is not null)
        {
            return problem;
        }

        return await AnswerAsync(id, null, model!, responseFormat, services);
    }

    /// <summary>Shared with the alias route: read and parse the body, run the plan, answer as JSON, SVG or CSV.</summary>
    internal static async Task<Results<Ok<PlanResponse>, ContentHttpResult, ProblemHttpResult>> AnswerAsync(
        string id, string? alias, CompiledModel model, ResponseFormat format, PlanServices services)
    {
        services.Log.Set("ModelId", id);
        var body = await ReadAsync(model, services);
        if (body.Problem is not null)
        {
            return body.Problem;
        }

        var call = body.Value!;
        services.Runner.Run(model, call, PlanDepth.Full, PlanRoute.Plan);
        if (call.Plan is not { } plan)
        {
            return ApiProblems.Validation(call.Errors);
        }

        services.Log.Set("PlanStatus", WireNames.Status(plan.Status));
        services.Log.Set("SolveMicroseconds", Math.Round(call.SolveMicroseconds, 1));
        if (format is ResponseFormat.Svg or ResponseFormat.Csv)
        {
            var outputs = Rows.Split(plan.Outputs, plan.OutputCount);
            var inputs = Rows.Split(plan.Inputs, plan.InputCount);
            var references = StageReferences(call, plan.Horizon);
            if (format == ResponseFormat.Csv)
            {
                var states = Rows.Split(plan.States, plan.StateCount);
                return TypedResults.Text(TrajectoryCsv.Plan(model, outputs, references, inputs, states, WireNames.Status(plan.Status), plan.Warnings), TrajectoryCsv.ContentType);
            }

            var chart = TrajectoryChart.Build($"Plan for {model.Document.Name ?? id[..12]} ({WireNames.Status(plan.Status)})", model, outputs, inputs, references, previousInput: call.HasPreviousInput ? call.PreviousInput : null);
            return TypedResults.Text(SvgChartWriter.Write(chart), ResponseFormats.SvgContentType);
        }

        return TypedResults.Ok(PlanMapping.ToResponse(id, alias, plan, call.SolveMicroseconds));
    }

    /// <summary>The setpoint of each stage 0…N−1: a schedule's rows with the last held, one setpoint held, or null without one.</summary>
    private static double[][]? StageReferences(PlanCall call, int horizon)
    {
        if (call.ReferenceRowCount > 0)
        {
            var rows = call.ReferenceRows;
            return [.. Enumerable.Range(0, horizon).Select(k => rows[Math.Min(k, call.ReferenceRowCount - 1)])];
        }

        return call.HasReference ? Enumerable.Repeat(call.Reference, horizon).ToArray() : null;
    }

    /// <summary>The body through the one plan-request parser; a syntax error is "malformed JSON", anything else names its fields.</summary>
    internal static Task<BodyResult<PlanCall>> ReadAsync(CompiledModel model, PlanServices services)
    {
        int depth = services.Reader.Limits.MaxJsonDepth;
        return services.Reader.ReadAsync(
            services.Request,
            bytes =>
            {
                var call = new PlanCall(model.StateCount, model.InputCount, model.OutputCount, model.DisturbanceCount, model.Horizon, model.Estimator?.DisturbanceCount ?? 0);
                PlanRequestParser.Parse(bytes, call, "", depth);
                if (call.SyntaxErrorAt is { } at)
                {
                    return BodyResult<PlanCall>.Fail(ApiProblems.JsonBody(new JsonErrorDescription(call.Errors[0], at.Line, at.Position)));
                }

                return call.Errors.Count > 0 ? BodyResult<PlanCall>.Fail(ApiProblems.Validation(call.Errors)) : BodyResult<PlanCall>.Ok(call);
            },
            services.CancellationToken);
    }
}
