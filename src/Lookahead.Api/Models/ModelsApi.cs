using Lookahead.Api.Access;
using Lookahead.Api.Catalog;
using Lookahead.Api.Http;
using Lookahead.Api.Storage;
using Microsoft.AspNetCore.Http.HttpResults;
using Serilog;

namespace Lookahead.Api.Models;

/// <summary>Registering, reading, listing and deleting models, and their receding-horizon gain.</summary>
public static class ModelsApi
{
    /// <summary>The models room's part of the OpenAPI contract.</summary>
    public static IServiceCollection AddModels(this IServiceCollection services)
    {
        services.ConfigureSwaggerGen(o =>
        {
            o.CloseSet<ModelRegistrationResponse>("timeDomain", CatalogServices.TimeDomains);
            o.CloseSet<EstimatorDiagnosticsDto>("disturbanceModel", CatalogServices.DisturbanceModels);
        });
        return services;
    }

    public static RouteGroupBuilder MapModelsApi(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/v1/models").WithTags("Models").RequireRateLimiting(RateLimitPolicy.Name);

        group.MapPost("", RegisterAsync)
            .RequireScope(AccessScopes.ModelsWrite)
            .WithName("RegisterModel")
            .WithRequestExample("""{"name":"double-integrator","plant":{"a":[[1,0.1],[0,1]],"b":[[0.005],[0.1]],"sampleTime":0.1,"timeDomain":"discrete"},"cost":{"horizon":10,"outputWeight":[[1,0],[0,0.1]],"inputWeight":[0.01],"terminalWeight":"riccati"},"limits":{"inputMin":[-1],"inputMax":[1]}}""")
            .WithSummary("Register a plant-and-cost model; its id is the SHA-256 of its canonical form")
            .Accepts<ModelDocumentDto>("application/json")
            .ProducesBodyProblems();

        group.MapGet("", ListAsync)
            .RequireScope(AccessScopes.PlansRun)
            .WithName("ListModels")
            .WithParameterExample("offset", "0")
            .WithParameterExample("limit", "50")
            .WithSummary("List registered models in registration order, a page at a time")
            .ProducesProblem(StatusCodes.Status400BadRequest);

        group.MapGet("/{id}", GetAsync)
            .RequireScope(AccessScopes.PlansRun)
            .WithName("GetModel")
            .WithParameterExample("id", OperationExampleConventions.ExampleModelId)
            .WithSummary("A registered model's document, dimensions and diagnostics; cacheable (ETag, immutable), 304 on a matching If-None-Match")
            .Produces(StatusCodes.Status304NotModified)
            .ProducesLookupProblems();

        group.MapDelete("/{id}", DeleteAsync)
            .RequireScope(AccessScopes.ModelsWrite)
            .WithName("DeleteModel")
            .WithParameterExample("id", OperationExampleConventions.ExampleModelId)
            .WithSummary("Delete a model (refused while an alias points at it)")
            .ProducesLookupProblems()
            .ProducesProblem(StatusCodes.Status409Conflict);

        group.MapGet("/{id}/gain", GetGainAsync)
            .RequireScope(AccessScopes.PlansRun)
            .WithName("GetModelGain")
            .WithParameterExample("id", OperationExampleConventions.ExampleModelId)
            .WithSummary("The receding-horizon gain K (u0 = −K x0), closed-loop eigenvalues and spectral radius")
            .ProducesLookupProblems();

        return group;
    }

    public static async Task<Results<Created<ModelRegistrationResponse>, Ok<ModelRegistrationResponse>, ProblemHttpResult>> RegisterAsync(
        HttpRequest request, RequestBodyReader reader, ModelCatalog catalog, RegistrationIntake intake, IDiagnosticContext log, CancellationToken cancellationToken)
    {
        var body = await reader.ReadJsonAsync<ModelDocumentDto>(request, cancellationToken, intake.EnterAsync);
        if (body.Problem is not null)
        {
            return body.Problem;
        }

        var registration = await catalog.RegisterAsync(Tenants.Of(request.HttpContext), body.Value!, cancellationToken);
        if (!registration.Accepted)
        {
            return ApiProblems.Validation(registration.Errors, "The model was not registered; see errors.");
        }

        log.Set("ModelId", registration.Id);
        var response = ModelResponses.Registration(registration.Id!, registration.Model!, registration.Created);
        return registration.Created
            ? TypedResults.Created($"/v1/models/{registration.Id}", response)
            : TypedResults.Ok(response);
    }

    public static async Task<Results<Ok<ModelPage>, ProblemHttpResult>> ListAsync(
        HttpContext context, ModelCatalog catalog, CancellationToken cancellationToken, int? offset = null, int? limit = null)
    {
        var page = PageRequest.Read(offset, limit, out var problem);
        if (problem is not null)
        {
            return problem;
        }

        var (from, size) = (page.Offset, page.Limit);
        var listing = await catalog.ListAsync(Tenants.Reading(context), from, size, cancellationToken);
        var items = listing.Items
            .Select(s => new ModelSummary(s.Id, s.Name, ModelResponses.Dimensions(s.States, s.Inputs, s.Outputs, s.Horizon), s.RegisteredAt))
            .ToList();
        return TypedResults.Ok(new ModelPage(items, from, size, listing.Total));
    }

    public static async Task<Results<Ok<ModelDetailsResponse>, StatusCodeHttpResult, ProblemHttpResult>> GetAsync(string id, HttpContext context, ModelCatalog catalog, CancellationToken cancellationToken)
    {
        if (!ModelId.IsWellFormed(id))
        {
            return ModelProblems.MalformedId(id);
        }

        string? tenant = Tenants.Reading(context);
        var found = await catalog.GetStoredAsync(tenant, id, cancellationToken);
        if (found is { } registered)
        {
            // Answered before the compiled model is looked up, so a revalidation never costs a compile.
            var tag = ModelCaching.Tag(id, registered.Stored.Summary.RegisteredAt);
            if (ModelCaching.IsFresh(context.Request, tag))
            {
                ModelCaching.Describe(context.Response, tag);
                return TypedResults.StatusCode(StatusCodes.Status304NotModified);
            }
        }

        var model = found is null ? null : await catalog.GetCompiledAsync(tenant, id);
        if (found is not { } stored || model is null)
        {
            return ModelProblems.ModelNotFound(id);
        }

        ModelCaching.Describe(context.Response, ModelCaching.Tag(id, stored.Stored.Summary.RegisteredAt));
        return TypedResults.Ok(ModelResponses.Details(id, stored, model));
    }

    public static async Task<Results<NoContent, ProblemHttpResult>> DeleteAsync(string id, HttpContext context, ModelCatalog catalog, CancellationToken cancellationToken)
    {
        if (!ModelId.IsWellFormed(id))
        {
            return ModelProblems.MalformedId(id);
        }

        var outcome = await catalog.DeleteAsync(Tenants.Of(context), id, cancellationToken);
        return outcome.Status switch
        {
            DeleteStatus.Deleted => TypedResults.NoContent(),
            DeleteStatus.ReferencedByAlias => ModelProblems.ReferencedByAlias(id, outcome.BlockingAlias!),
            _ => ModelProblems.ModelNotFound(id),
        };
    }

    public static async Task<Results<Ok<GainResponse>, ProblemHttpResult>> GetGainAsync(string id, HttpContext context, ModelCatalog catalog)
    {
        var (model, problem) = await ModelLookup.FindAsync(id, context, catalog);
        return problem is not null ? problem : TypedResults.Ok(ModelResponses.Gain(id, model!));
    }
}
