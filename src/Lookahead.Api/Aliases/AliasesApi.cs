using Lookahead.Api.Access;
using Lookahead.Api.Catalog;
using Lookahead.Api.Charts;
using Lookahead.Api.Http;
using Lookahead.Api.Models;
using Lookahead.Api.Plans;
using Lookahead.Api.Storage;
using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Aliases;

/// <summary>Named pointers to models, so a station can follow a re-tuned model without reconfiguration.</summary>
public static class AliasesApi
{
    /// <summary>The aliases room's part of the OpenAPI contract.</summary>
    public static IServiceCollection AddAliases(this IServiceCollection services)
    {
        services.ConfigureSwaggerGen(o => o.RequireMembers<AliasRequest>("modelId"));
        return services;
    }

    public static RouteGroupBuilder MapAliasesApi(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/v1/aliases").WithTags("Aliases").RequireRateLimiting(RateLimitPolicy.Name);

        group.MapGet("", ListAsync)
            .RequireScope(AccessScopes.PlansRun)
            .WithName("ListAliases")
            .WithParameterExample("offset", "0")
            .WithParameterExample("limit", "50")
            .WithSummary("List the caller's tenant's aliases by name, a page at a time")
            .ProducesProblem(StatusCodes.Status400BadRequest);

        group.MapPut("/{name}", PutAsync)
            .RequireScope(AccessScopes.ModelsWrite)
            .WithName("SetAlias")
            .WithParameterExample("name", "cold-store-demo")
            .WithRequestExample("""{"modelId":"729cfef133dc15239c2f676cdf5375074faee452a2e73d5ad1d00987189169d9"}""")
            .WithSummary("Point an alias at a model (created if new); every change is kept in its history")
            .Accepts<AliasRequest>("application/json")
            .ProducesLookupProblems()
            .ProducesProblem(StatusCodes.Status413PayloadTooLarge)
            .ProducesProblem(StatusCodes.Status415UnsupportedMediaType);

        group.MapGet("/{name}", GetAsync)
            .RequireScope(AccessScopes.PlansRun)
            .WithName("GetAlias")
            .WithParameterExample("name", "cold-store-demo")
            .WithSummary("An alias's current model and its history with timestamps")
            .ProducesLookupProblems();

        group.MapDelete("/{name}", DeleteAsync)
            .RequireScope(AccessScopes.ModelsWrite)
            .WithName("DeleteAlias")
            .WithParameterExample("name", "cold-store-demo")
            .WithSummary("Delete an alias and its history (the model stays)")
            .ProducesLookupProblems();

        group.MapPost("/{name}/plan", PlanAsync)
            .IsSolverWork()
            .RequireScope(AccessScopes.PlansRun)
            .WithName("PlanForAlias")
            .WithParameterExample("name", "cold-store-demo")
            .WithRequestExample("""{"state":[-17.5,-18.5,-19.5],"previousInput":[30,30,0]}""")
            .WithSummary("Plan with the model the alias points at now; the answer names that model (?format=svg or csv as for a plan)")
            .Accepts<PlanRequestDto>("application/json")
            .WithMetadata(new SvgAlternativeMetadata(), new CsvAlternativeMetadata())
            .ProducesBodyProblemsForModel();

        return group;
    }

    public static async Task<Results<Created<AliasResponse>, Ok<AliasResponse>, ProblemHttpResult>> PutAsync(
        string name, HttpRequest request, RequestBodyReader reader, IModelStore store, AliasResolver resolver, TimeProvider time, CancellationToken cancellationToken)
    {
        if (!AliasName.IsWellFormed(name))
        {
            return AliasProblems.MalformedAlias(name);
        }

        var body = await reader.ReadJsonAsync<AliasRequest>(request, cancellationToken);
        if (body.Problem is not null)
        {
            return body.Problem;
        }

        string? modelId = body.Value!.ModelId;
        if (modelId is null)
        {
            return ApiProblems.Validation("modelId", "is required");
        }

        if (!ModelId.IsWellFormed(modelId))
        {
            return ModelProblems.MalformedId(modelId, "modelId");
        }

        string tenant = Tenants.Of(request.HttpContext);
        var outcome = await store.SetAliasAsync(tenant, name, modelId, time.GetUtcNow(), Tenants.ChangedBy(request.HttpContext), cancellationToken);
        resolver.Forget(tenant, name);
        return outcome.Status switch
        {
            AliasStatus.ModelNotFound => ModelProblems.ModelNotFound(modelId, "modelId"),
            AliasStatus.Created => TypedResults.Created($"/v1/aliases/{name}", ToResponse(outcome.Alias!)),
            _ => TypedResults.Ok(ToResponse(outcome.Alias!)),
        };
    }

    /// <remarks>Aliases are named within a tenant, so even an admin key lists only its own tenant's (as it reads them).</remarks>
    public static async Task<Results<Ok<AliasPage>, ProblemHttpResult>> ListAsync(
        HttpContext context, IModelStore store, CancellationToken cancellationToken, int? offset = null, int? limit = null)
    {
        var page = PageRequest.Read(offset, limit, out var problem);
        if (problem is not null)
        {
            return problem;
        }

        var listing = await store.ListAliasesAsync(Tenants.Of(context), page.Offset, page.Limit, cancellationToken);
        var items = listing.Items.Select(a => new AliasSummary(a.Name, a.ModelId, a.UpdatedAt)).ToList();
        return TypedResults.Ok(new AliasPage(items, page.Offset, page.Limit, listing.Total));
    }

    public static async Task<Results<Ok<AliasResponse>, ProblemHttpResult>> GetAsync(string name, HttpContext context, IModelStore store, CancellationToken cancellationToken)
    {
        if (!AliasName.IsWellFormed(name))
        {
            return AliasProblems.MalformedAlias(name);
        }

        var alias = await store.GetAliasAsync(Tenants.Of(context), name, cancellationToken);
        return alias is null ? AliasProblems.AliasNotFound(name) : TypedResults.Ok(ToResponse(alias));
    }

    public static async Task<Results<NoContent, ProblemHttpResult>> DeleteAsync(
        string name, HttpContext context, IModelStore store, AliasResolver resolver, CancellationToken cancellationToken)
    {
        if (!AliasName.IsWellFormed(name))
        {
            return AliasProblems.MalformedAlias(name);
        }

        string tenant = Tenants.Of(context);
        bool deleted = await store.DeleteAliasAsync(tenant, name, cancellationToken);
        resolver.Forget(tenant, name);
        return deleted ? TypedResults.NoContent() : AliasProblems.AliasNotFound(name);
    }

    public static async Task<Results<Ok<PlanResponse>, ContentHttpResult, ProblemHttpResult>> PlanAsync(
        string name, AliasResolver resolver, [AsParameters] PlanServices services, string? format = null)
    {
        if (!AliasName.IsWellFormed(name))
        {
            return AliasProblems.MalformedAlias(name);
        }

        if (!ResponseFormats.TryParse(format, out var responseFormat, out var formatProblem))
        {
            return formatProblem!;
        }

        // Re-pointed here: effective at once; on another instance: within Cache:AliasSeconds.
        string tenant = Tenants.Of(services.Request.HttpContext);
        string? modelId = await resolver.ResolveAsync(tenant, name, services.CancellationToken);
        if (modelId is null)
        {
            return AliasProblems.AliasNotFound(name);
        }

        var model = await services.Catalog.GetCompiledAsync(tenant, modelId);
        if (model is null)
        {
            return ModelProblems.ModelNotFound(modelId);
        }

        services.Log.Set("Alias", name);
        return await PlansApi.AnswerAsync(modelId, name, model, responseFormat, services);
    }

    private static AliasResponse ToResponse(AliasRecord alias) =>
        new(alias.Name, alias.ModelId, alias.UpdatedAt, alias.History.Select(h => new AliasHistoryEntry(h.ModelId, h.SetAt, h.ChangedBy)).ToList());
}
