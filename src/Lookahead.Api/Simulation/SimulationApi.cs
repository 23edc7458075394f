using Lookahead.Api.Access;
using Lookahead.Api.Charts;
using Lookahead.Api.Http;
using Lookahead.Api.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;
using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Simulation;

/// <summary>Closed-loop simulation: what the controller would do over time, optionally against a different true plant.</summary>
public static class SimulationApi
{
    /// <summary>The simulation room's part of the OpenAPI contract.</summary>
    public static IServiceCollection AddSimulation(this IServiceCollection services)
    {
        services.ConfigureSwaggerGen(o =>
        {
            o.RequireMembers<SimulationRequestDto>("initialState", "steps");
            o.CloseSet<SimulationRequestDto>("feedback", ["state", "estimate"]);
            o.RequireMembers<ReferenceChangeDto>("fromStep", "reference");
            o.RequireMembers<MeasuredDisturbanceChangeDto>("fromStep", "disturbance");
            o.RequireMembers<OutputDisturbanceChangeDto>("fromStep", "offset");
            o.RequireMembers<MeasurementNoiseDto>("standardDeviation");
            o.RequireMembers<TruePlantDto>("a", "b");
            o.CloseSet<TruePlantDto>("timeDomain", Catalog.CatalogServices.TimeDomains);
        });
        return services;
    }

    public static RouteGroupBuilder MapSimulationApi(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/v1/models").WithTags("Simulation").RequireRateLimiting(RateLimitPolicy.Name);

        group.MapPost("/{id}/simulate", SimulateAsync)
            .IsSolverWork()
            .RequireScope(AccessScopes.PlansRun)
            .WithName("SimulateModel")
            .WithParameterExample("id", OperationExampleConventions.ExampleModelId)
            .WithRequestExample("""{"initialState":[-17.5,-18.5,-19.5],"steps":60,"previousInput":[20,20,0],"references":[{"fromStep":0,"reference":[-20,-20,-20]},{"fromStep":30,"reference":[-21.5,-21,-21]}]}""")
            .WithSummary("Closed-loop run applying each plan's first move (?format=svg for a chart, ?format=csv for a table)")
            .Accepts<SimulationRequestDto>("application/json")
            .WithMetadata(new SvgAlternativeMetadata(), new CsvAlternativeMetadata())
            .ProducesBodyProblemsForModel();

        return group;
    }

    public static async Task<Results<Ok<SimulationResponse>, ContentHttpResult, ProblemHttpResult>> SimulateAsync(
        string id, [AsParameters] SimulationServices services, string? format = null)
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

        var body = await services.Reader.ReadJsonAsync<SimulationRequestDto>(services.Request, services.CancellationToken);
        if (body.Problem is not null)
        {
            return body.Problem;
        }

        services.Log.Set("ModelId", id);
        var errors = new List<ValidationError>();
        var simulation = SimulationMapping.ToCore(body.Value!, model!, errors);
        if (errors.Count > 0)
        {
            return ApiProblems.Validation(errors);
        }

        SimulationResult result;
        try
        {
            result = await Task.Run(() => ClosedLoopSimulator.Simulate(model!, simulation), services.CancellationToken);
        }
        catch (ModelValidationException ex)
        {
            return ApiProblems.Validation(ex.Errors);
        }

        services.Metrics.SimulatedPlans.WithLabels("optimal").Inc(result.Steps - result.NonOptimalSteps);
        services.Metrics.SimulatedPlans.WithLabels("not-optimal").Inc(result.NonOptimalSteps);
        if (responseFormat == ResponseFormat.Svg)
        {
            var chart = TrajectoryChart.Build($"Closed loop: {model!.Document.Name ?? id[..12]}, {result.Steps} steps", model, result.Outputs, result.Inputs, result.References, result.EstimatedOutputs, simulation.PreviousInput);
            return TypedResults.Text(SvgChartWriter.Write(chart), ResponseFormats.SvgContentType);
        }

        if (responseFormat == ResponseFormat.Csv)
        {
            return TypedResults.Text(TrajectoryCsv.Simulation(model!, result), TrajectoryCsv.ContentType);
        }

        return TypedResults.Ok(SimulationMapping.ToResponse(id, model!, result));
    }
}
