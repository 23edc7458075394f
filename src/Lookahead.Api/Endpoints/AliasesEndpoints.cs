using Lookahead.Api.Catalog;
using Lookahead.Api.Configuration;
using Lookahead.Api.Contracts;
using Lookahead.Api.Json;
using Lookahead.Api.Plans;
using Lookahead.Api.Problems;
using Lookahead.Api.Storage;
using Microsoft.AspNetCore.Http.HttpResults;
using Serilog;

namespace Lookahead.Api.Endpoints;

/// <summary>Named pointers to models, so a station can follow a re-tuned model without reconfiguration.</summary>
public static class AliasesEndpoints
{
    public static RouteGroupBuilder MapAliasesEndpoints(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/v1/aliases").WithTags("Aliases").RequireRateLimiting(RateLimitingOptions.PolicyName);

        group.MapPut("/{name}", PutAsync)
            .WithName("SetAlias")
            .WithSummary("Point an alias at a model (created if new); every change is kept in its history")
            .Accepts<AliasRequest>("application/json")
            .ProducesProblem(StatusCodes.Status400BadRequest)
            .ProducesProblem(StatusCodes.Status404NotFound)
            .ProducesProblem(StatusCodes.Status415UnsupportedMediaType);

        group.MapGet("/{name}", GetAsync)
            .WithName("GetAlias")
            .WithSummary("An alias's current model and its history with timestamps")
            .ProducesProblem(StatusCodes.Status400BadRequest)
            .ProducesProblem(StatusCodes.Status404NotFound);

        group.MapDelete("/{name}", DeleteAsync)
            .WithName("DeleteAlias")
            .WithSummary("Delete an alias and its history (the model stays)")
            .ProducesProblem(StatusCodes.Status400BadRequest)
            .ProducesProblem(StatusCodes.Status404NotFound);

        group.MapPost("/{name}/plan", PlanAsync)
            .WithName("PlanForAlias")
            .WithSummary("Plan with the model the alias points at now; the answer names that model")
            .Accepts<PlanRequestDto>("application/json")
            .WithMetadata(new Composition.SvgAlternativeMetadata())
            .ProducesBodyProblemsForModel();

        return group;
    }

    public static async Task<Results<Created<AliasResponse>, Ok<AliasResponse>, ProblemHttpResult>> PutAsync(
        string name, HttpRequest request, RequestBodyReader reader, IModelStore store, TimeProvider time, CancellationToken cancellationToken)
    {
        if (!AliasName.IsWellFormed(name))
        {
            return ApiProblems.MalformedAlias(name);
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
            return ApiProblems.MalformedId(modelId, "modelId");
        }

        var outcome = await store.SetAliasAsync(name, modelId, time.GetUtcNow(), cancellationToken);
        return outcome.Status switch
        {
            AliasStatus.ModelNotFound => ApiProblems.ModelNotFound(modelId, "modelId"),
            AliasStatus.Created => TypedResults.Created($"/v1/aliases/{name}", ToResponse(outcome.Alias!)),
            _ => TypedResults.Ok(ToResponse(outcome.Alias!)),
        };
    }

    public static async Task<Results<Ok<AliasResponse>, ProblemHttpResult>> GetAsync(string name, IModelStore store, CancellationToken cancellationToken)
    {
        if (!AliasName.IsWellFormed(name))
        {
            return ApiProblems.MalformedAlias(name);
        }

        var alias = await store.GetAliasAsync(name, cancellationToken);
        return alias is null ? ApiProblems.AliasNotFound(name) : TypedResults.Ok(ToResponse(alias));
    }

    public static async Task<Results<NoContent, ProblemHttpResult>> DeleteAsync(string name, IModelStore store, CancellationToken cancellationToken)
    {
        if (!AliasName.IsWellFormed(name))
        {
            return ApiProblems.MalformedAlias(name);
        }

        return await store.DeleteAliasAsync(name, cancellationToken) ? TypedResults.NoContent() : ApiProblems.AliasNotFound(name);
    }

    public static async Task<Results<Ok<PlanResponse>, ContentHttpResult, ProblemHttpResult>> PlanAsync(
        string name,
        HttpRequest request,
        RequestBodyReader reader,
        IModelStore store,
        ModelCatalog catalog,
        PlanExecutor executor,
        IDiagnosticContext log,
        CancellationToken cancellationToken,
        string? format = null)
    {
        if (!AliasName.IsWellFormed(name))
        {
            return ApiProblems.MalformedAlias(name);
        }

        if (!ResponseFormats.TryParse(format, out var responseFormat, out var formatProblem))
        {
            return formatProblem!;
        }

        // Resolved on every request so a re-pointed alias takes effect at once, on every instance.
        var alias = await store.GetAliasAsync(name, cancellationToken);
        if (alias is null)
        {
            return ApiProblems.AliasNotFound(name);
        }

        var model = await catalog.GetCompiledAsync(alias.ModelId);
        if (model is null)
        {
            return ApiProblems.ModelNotFound(alias.ModelId);
        }

        log.Set("Alias", name);
        return await PlansEndpoints.RespondAsync(alias.ModelId, name, model, responseFormat, request, reader, executor, log, cancellationToken);
    }

    private static AliasResponse ToResponse(AliasRecord alias) =>
        new(alias.Name, alias.ModelId, alias.UpdatedAt, alias.History.Select(h => new AliasHistoryEntry(h.ModelId, h.SetAt)).ToList());
}
