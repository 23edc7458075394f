using Lookahead.Api.Catalog;
using Lookahead.Api.Charts;
using Lookahead.Api.Configuration;
using Lookahead.Api.Contracts;
using Lookahead.Api.Json;
using Lookahead.Api.Plans;
using Lookahead.Api.Problems;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;
using Microsoft.AspNetCore.Http.HttpResults;
using Serilog;

namespace Lookahead.Api.Endpoints;

/// <summary>Closed-loop simulation: what the controller would do over time, optionally against a different true plant.</summary>
public static class SimulationEndpoints
{
    public static RouteGroupBuilder MapSimulationEndpoints(this IEndpointRouteBuilder routes)
    {
        var group = routes.MapGroup("/v1/models").WithTags("Simulation").RequireRateLimiting(RateLimitingOptions.PolicyName);

        group.MapPost("/{id}/simulate", SimulateAsync)
            .WithName("SimulateModel")
            .WithSummary("Closed-loop run applying each plan's first move (?format=svg for a chart)")
            .Accepts<SimulationRequestDto>("application/json")
            .WithMetadata(new Composition.SvgAlternativeMetadata())
            .ProducesBodyProblemsForModel();

        return group;
    }

    public static async Task<Results<Ok<SimulationResponse>, ContentHttpResult, ProblemHttpResult>> SimulateAsync(
        string id,
        HttpRequest request,
        RequestBodyReader reader,
        ModelCatalog catalog,
        IDiagnosticContext log,
        CancellationToken cancellationToken,
        string? format = null)
    {
        if (!ResponseFormats.TryParse(format, out var responseFormat, out var formatProblem))
        {
            return formatProblem!;
        }

        var (model, problem) = await ModelLookup.FindAsync(id, catalog);
        if (problem is not null)
        {
            return problem;
        }

        var body = await reader.ReadJsonAsync<SimulationRequestDto>(request, cancellationToken);
        if (body.Problem is not null)
        {
            return body.Problem;
        }

        log.Set("ModelId", id);
        var errors = new List<ProblemError>();
        var simulation = ToCore(body.Value!, model!, errors);
        if (errors.Count > 0)
        {
            return ApiProblems.Validation(errors);
        }

        SimulationResult result;
        try
        {
            result = await Task.Run(() => ClosedLoopSimulator.Simulate(model!, simulation), cancellationToken);
        }
        catch (ModelValidationException ex)
        {
            return ApiProblems.Validation(ex.Errors);
        }

        if (responseFormat == ResponseFormat.Svg)
        {
            var chart = TrajectoryChart.Build($"Closed loop: {model!.Document.Name ?? id[..12]}, {result.Steps} steps", model, result.Outputs, result.Inputs, result.References);
            return TypedResults.Text(SvgChartWriter.Write(chart), ResponseFormats.SvgContentType);
        }

        return TypedResults.Ok(new SimulationResponse(id, result.Steps, model!.SampleTime, result.States, result.Inputs, result.Outputs, result.References, result.TotalCost, result.NonOptimalSteps, result.Warnings));
    }

    private static SimulationRequest ToCore(SimulationRequestDto dto, CompiledModel model, List<ProblemError> errors)
    {
        if (dto.InitialState is null)
        {
            errors.Add(new("initialState", "is required"));
        }

        if (dto.Steps is null)
        {
            errors.Add(new("steps", $"is required (1 to {ClosedLoopSimulator.MaxSteps})"));
        }

        List<ReferenceChange>? references = null;
        if (dto.References is { } schedule)
        {
            references = new List<ReferenceChange>(schedule.Length);
            for (int i = 0; i < schedule.Length; i++)
            {
                var change = schedule[i];
                if (change?.FromStep is null)
                {
                    errors.Add(new($"references[{i}].fromStep", "is required"));
                }

                if (change?.Reference is null)
                {
                    errors.Add(new($"references[{i}].reference", "is required"));
                }

                references.Add(new ReferenceChange(change?.FromStep ?? 0, change?.Reference!));
            }
        }

        PlantSpec? truePlant = null;
        if (dto.TruePlant is { } plant)
        {
            var domain = ModelDocumentMapper.ParseTimeDomain(plant.TimeDomain, "truePlant.timeDomain", errors);
            if (plant.A is null)
            {
                errors.Add(new("truePlant.a", "is required"));
            }

            if (plant.B is null)
            {
                errors.Add(new("truePlant.b", "is required"));
            }

            truePlant = new PlantSpec(plant.A!, plant.B!, null, model.SampleTime, domain);
        }

        return new SimulationRequest(dto.InitialState!, dto.Steps ?? 0, references, truePlant, dto.Disturbances, dto.PreviousInput);
    }
}
