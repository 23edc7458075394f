using Lookahead.Api.Access;
using System.Security.Cryptography;
using System.Text.Json;
using System.Text.Json.Serialization.Metadata;
using Lookahead.Api.Catalog;
using Lookahead.Api.Estimation;
using Lookahead.Api.Http;
using Lookahead.Api.Models;
using Lookahead.Api.Storage;
using Lookahead.Core.Estimation;
using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Stations;

/// <summary>
/// Stations: named loops bound to a model that keep their estimator state, so a client sends only each new
/// measurement. Steps of one station are serialised here and guarded by their sequence in the store.
/// </summary>
public static class StationsApi
{
    public static IServiceCollection AddStations(this IServiceCollection services)
    {
        services.AddSingleton<StationLocks>();
        services.AddSingleton<StationMetrics>();
        services.AddSingleton<StationLog>();
        services.AddOptions<StationOptions>().BindConfiguration(StationOptions.Section).ValidateDataAnnotations().ValidateOnStart();

        // Both stores keep stations beside their models, on the same connections and durability settings.
        services.AddSingleton(sp => (IStationStore)sp.GetRequiredService<IModelStore>());
        services.ConfigureSwaggerGen(o =>
        {
            string[] details = [StationDetail.FirstMove, StationDetail.Full];
            o.RequireMembers<StationRequest>("model");
            o.CloseSet<StationRequest>("detail", details);
            o.CloseSet<StationResponse>("detail", details);
            o.RequireMembers<StationStepRequest>("sequence");
            o.CloseSet<StationStepRequest>("mode", [StationStep.Auto, StationStep.Track]);
            o.CloseSet<StationStepResponse>("status", WarningCodes.PlanStatuses.Append(StationStep.TrackingStatus));
            o.CloseQuerySet("GetStationSteps", "format", ["json", "csv"]);
        });
        return services;
    }

    public static RouteGroupBuilder MapStationsApi(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/v1/stations").WithTags("Stations").RequireRateLimiting(RateLimitPolicy.Name)
            .RequireScope(AccessScopes.StationsStep);

        group.MapPut("/{name}", PutAsync)
            .WithName("PutStation")
            .WithParameterExample("name", "dock-loop")
            .WithRequestExample("""{"model":"cold-store-demo","detail":"first-move"}""")
            .WithSummary("Bind a station to a model (id or alias name) with a fresh state; replacing one starts it over")
            .Accepts<StationRequest>("application/json")
            .ProducesBodyProblems();

        group.MapGet("", ListAsync)
            .WithName("ListStations")
            .WithParameterExample("offset", "0")
            .WithParameterExample("limit", "50")
            .WithSummary("List stations in name order, a page at a time")
            .ProducesProblem(StatusCodes.Status400BadRequest);

        group.MapGet("/{name}", GetAsync)
            .WithName("GetStation")
            .WithParameterExample("name", "dock-loop")
            .WithSummary("A station's model, estimate, last applied input, last suggested move and sequence")
            .ProducesLookupProblems();

        group.MapDelete("/{name}", DeleteAsync)
            .WithName("DeleteStation")
            .WithParameterExample("name", "dock-loop")
            .WithSummary("Delete a station and its state")
            .ProducesLookupProblems();

        group.MapGet("/{name}/steps", StationHistoryEndpoint.GetStepsAsync)
            .WithName("GetStationSteps")
            .WithParameterExample("name", "dock-loop")
            .WithParameterExample("limit", "100")
            .WithSummary("A station's most recent steps, oldest first: what each asked and answered (?format=csv for a table)")
            .Produces<StationStepHistory>(StatusCodes.Status200OK, "application/json")
            .Produces<string>(StatusCodes.Status200OK, StationHistoryCsv.ContentType)
            .ProducesLookupProblems();

        group.MapPost("/{name}/step", StationStepEndpoint.StepAsync)
            .IsSolverWork()
            .WithName("StepStation")
            .WithParameterExample("name", "dock-loop")
            .WithRequestExample("""{"sequence":0,"measurement":[-19.2,-19.6,-19.9],"appliedInput":[30,30,0],"disturbance":[15],"timestamp":"2026-12-02T06:00:00Z"}""")
            .WithSummary("One sample: update the station's estimate with the measurement and suggest the next move")
            .Accepts<StationStepRequest>("application/json")
            .ProducesBodyProblemsForModel()
            .ProducesProblem(StatusCodes.Status409Conflict);

        return group;
    }

    public static async Task<Results<Created<StationResponse>, Ok<StationResponse>, ProblemHttpResult>> PutAsync(string name, [AsParameters] StationServices services)
    {
        if (!AliasName.IsWellFormed(name))
        {
            return StationProblems.MalformedName(name);
        }

        var body = await services.Reader.ReadJsonAsync<StationRequest>(services.Request, services.CancellationToken);
        if (body.Problem is not null)
        {
            return body.Problem;
        }

        string? reference = body.Value!.Model;
        string detail = body.Value.Detail ?? StationDetail.FirstMove;
        if (detail is not (StationDetail.FirstMove or StationDetail.Full))
        {
            return ApiProblems.Validation("detail", $"must be '{StationDetail.FirstMove}' or '{StationDetail.Full}'");
        }

        string tenant = Tenants.Of(services.Request.HttpContext);
        string? modelId;
        if (reference is null)
        {
            return ApiProblems.Validation("model", "is required: a model id or an alias name");
        }
        else if (ModelId.IsWellFormed(reference))
        {
            modelId = reference;
        }
        else if (AliasName.IsWellFormed(reference))
        {
            modelId = (await services.Models.GetAliasAsync(tenant, reference, services.CancellationToken))?.ModelId;
            if (modelId is null)
            {
                return ApiProblems.Validation("model", $"no alias named '{reference}' exists");
            }
        }
        else
        {
            return ApiProblems.Validation("model", "is neither a model id (64 lower-case hexadecimal digits) nor an alias name");
        }

        var model = await services.Catalog.GetCompiledAsync(tenant, modelId);
        if (model is null)
        {
            return ApiProblems.Validation("model", $"no model with id {modelId} is registered");
        }

        if (model.Estimator is null)
        {
            return ApiProblems.Validation("model", "the model has no estimator: a station estimates from measurements, so register the model with one");
        }

        var record = new StationRecord(name, reference, modelId, detail, 0, 0, null, null, null, null, null, null, services.Time.GetUtcNow()) { Tenant = tenant };
        bool created = await services.Stations.PutStationAsync(record, services.CancellationToken);
        var response = ToResponse(record, services.Reader.SerializerOptions);
        return created ? TypedResults.Created($"/v1/stations/{name}", response) : TypedResults.Ok(response);
    }

    public static async Task<Results<Ok<StationPage>, ProblemHttpResult>> ListAsync(
        HttpContext context,
        IStationStore stations, RequestBodyReader reader, CancellationToken cancellationToken, int? offset = null, int? limit = null)
    {
        var page = PageRequest.Read(offset, limit, out var problem);
        if (problem is not null)
        {
            return problem;
        }

        var (from, size) = (page.Offset, page.Limit);
        var listing = await stations.ListStationsAsync(Tenants.Of(context), from, size, cancellationToken);
        var items = listing.Items.Select(s => ToResponse(s, reader.SerializerOptions)).ToList();
        return TypedResults.Ok(new StationPage(items, from, size, listing.Total));
    }

    public static async Task<Results<Ok<StationResponse>, ProblemHttpResult>> GetAsync(
        string name, HttpContext context, IStationStore stations, RequestBodyReader reader, CancellationToken cancellationToken)
    {
        if (!AliasName.IsWellFormed(name))
        {
            return StationProblems.MalformedName(name);
        }

        var station = await stations.GetStationAsync(Tenants.Of(context), name, cancellationToken);
        return station is null ? StationProblems.NotFound(name) : TypedResults.Ok(ToResponse(station, reader.SerializerOptions));
    }

    public static async Task<Results<NoContent, ProblemHttpResult>> DeleteAsync(string name, HttpContext context, IStationStore stations, CancellationToken cancellationToken)
    {
        if (!AliasName.IsWellFormed(name))
        {
            return StationProblems.MalformedName(name);
        }

        return await stations.DeleteStationAsync(Tenants.Of(context), name, cancellationToken) ? TypedResults.NoContent() : StationProblems.NotFound(name);
    }

    private static StationResponse ToResponse(StationRecord s, JsonSerializerOptions json) => new(
        s.Name,
        s.ModelReference,
        s.ModelId,
        s.Detail,
        s.Sequence,
        s.StepCount,
        s.Estimate is null ? null : StationJson.Read<StateEstimateDto>(s.Estimate, json),
        s.LastAppliedInput is null ? null : StationJson.Read<double[]>(s.LastAppliedInput, json),
        s.LastFirstMove is null ? null : StationJson.Read<double[]>(s.LastFirstMove, json),
        s.LastTimestamp,
        s.UpdatedAt);
}
