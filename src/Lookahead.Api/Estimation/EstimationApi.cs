using Lookahead.Api.Access;
using Lookahead.Api.Http;
using Lookahead.Api.Models;
using Lookahead.Core.Estimation;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;
using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Estimation;

/// <summary>Stateless estimator samples for models registered with an estimator: the station keeps the last answer.</summary>
public static class EstimationApi
{
    /// <summary>The estimation room's part of the OpenAPI contract.</summary>
    public static IServiceCollection AddEstimation(this IServiceCollection services)
    {
        services.ConfigureSwaggerGen(o => o.RequireMembers<EstimateRequestDto>("appliedInput"));
        return services;
    }

    public static RouteGroupBuilder MapEstimationApi(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/v1/models").WithTags("Estimation").RequireRateLimiting(RateLimitPolicy.Name);

        group.MapPost("/{id}/estimate", EstimateAsync)
            .IsSolverWork()
            .RequireScope(AccessScopes.PlansRun)
            .WithName("EstimateState")
            .WithParameterExample("id", OperationExampleConventions.ExampleModelId)
            .WithRequestExample("""{"appliedInput":[30,30,0],"measurement":[-19.2,-19.6,-19.9],"measuredDisturbance":[15]}""")
            .WithSummary("One estimator sample: propagate the last estimate with the applied input, correct it with the measurement")
            .Accepts<EstimateRequestDto>("application/json")
            .ProducesBodyProblemsForModel();

        return group;
    }

    public static async Task<Results<Ok<EstimateResponse>, ProblemHttpResult>> EstimateAsync(string id, [AsParameters] EstimationServices services)
    {
        var (model, problem) = await ModelLookup.FindAsync(id, services.Request.HttpContext, services.Catalog);
        if (problem is not null)
        {
            return problem;
        }

        var body = await services.Reader.ReadJsonAsync<EstimateRequestDto>(services.Request, services.CancellationToken);
        if (body.Problem is not null)
        {
            return body.Problem;
        }

        services.Log.Set("ModelId", id);
        var dto = body.Value!;
        var previous = dto.Estimate is { } e ? new StateEstimate(e.State!, e.Disturbance ?? []) : null;
        if (dto.Estimate is { State: null })
        {
            return ApiProblems.Validation([new ValidationError("estimate.state", "is required when an estimate is given")]);
        }

        EstimateResult result;
        try
        {
            result = model!.Estimate(new EstimateRequest(previous, dto.AppliedInput!, dto.Measurement, dto.MeasuredDisturbance));
        }
        catch (ModelValidationException ex)
        {
            return ApiProblems.Validation(ex.Errors);
        }

        var warnings = new List<Warning>();
        if (!result.MeasurementUsed)
        {
            warnings.Add(new Warning(WarningCode.MeasurementMissing));
        }

        if (result.Initialised)
        {
            warnings.Add(new Warning(WarningCode.EstimateInitialised));
        }

        return TypedResults.Ok(new EstimateResponse(
            id,
            new StateEstimateDto(result.Estimate.State, result.Estimate.Disturbance),
            result.PredictedMeasurement,
            result.Innovation,
            result.MeasurementUsed,
            result.Initialised,
            WarningText.ToDtos(warnings)));
    }
}
