using Lookahead.Api.Catalog;
using Lookahead.Api.Http;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;

namespace Lookahead.Api.Simulation;

/// <summary>Simulation requests to the core (field errors collected with their paths) and results to the wire.</summary>
public static class SimulationMapping
{
    public static SimulationRequest ToCore(SimulationRequestDto dto, CompiledModel model, List<ValidationError> errors)
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
            var domain = ModelDocumentMapping.ParseTimeDomain(plant.TimeDomain, "truePlant.timeDomain", errors);
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

    public static SimulationResponse ToResponse(string id, CompiledModel model, SimulationResult result) => new(
        id,
        result.Steps,
        model.SampleTime,
        result.States,
        result.Inputs,
        result.Outputs,
        result.References,
        result.TotalCost,
        result.NonOptimalSteps,
        WarningText.ToDtos(result.Warnings));
}
