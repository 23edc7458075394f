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

        var measured = Schedule(dto.MeasuredDisturbances, "measuredDisturbances", "disturbance", c => c?.FromStep, c => c?.Disturbance, (from, v) => new MeasuredDisturbanceChange(from, v), errors);
        var offsets = Schedule(dto.OutputDisturbance, "outputDisturbance", "offset", c => c?.FromStep, c => c?.Offset, (from, v) => new OutputDisturbanceChange(from, v), errors);
        var feedback = ParseFeedback(dto.Feedback, errors);
        MeasurementNoise? noise = null;
        if (dto.MeasurementNoise is { } spec)
        {
            if (spec.StandardDeviation is null)
            {
                errors.Add(new("measurementNoise.standardDeviation", $"is required ({model.OutputCount} entries, one per output)"));
            }

            noise = new MeasurementNoise(spec.StandardDeviation!, spec.Seed ?? 0);
        }

        return new SimulationRequest(dto.InitialState!, dto.Steps ?? 0, references, truePlant, dto.Disturbances, dto.PreviousInput, measured, offsets, feedback, noise);
    }

    /// <summary>A schedule of {fromStep, vector} changes; the core checks steps and widths, this only names what is missing.</summary>
    private static List<TCore>? Schedule<TDto, TCore>(
        TDto[]? changes, string path, string vectorName, Func<TDto?, int?> fromStep, Func<TDto?, double[]?> vector,
        Func<int, double[], TCore> create, List<ValidationError> errors)
    {
        if (changes is null)
        {
            return null;
        }

        // Bounded by the body and array limits already; the core refuses more changes than steps.
        var result = new List<TCore>(changes.Length);
        for (int i = 0; i < changes.Length; i++)
        {
            if (fromStep(changes[i]) is null)
            {
                errors.Add(new($"{path}[{i}].fromStep", "is required"));
            }

            if (vector(changes[i]) is null)
            {
                errors.Add(new($"{path}[{i}].{vectorName}", "is required"));
            }

            result.Add(create(fromStep(changes[i]) ?? 0, vector(changes[i])!));
        }

        return result;
    }

    private static SimulationFeedback ParseFeedback(string? feedback, List<ValidationError> errors)
    {
        switch (feedback)
        {
            case null or "state":
                return SimulationFeedback.State;
            case "estimate":
                return SimulationFeedback.Estimate;
            default:
                errors.Add(new("feedback", "must be \"state\" (plan from the true state) or \"estimate\" (plan from the model's estimator)"));
                return SimulationFeedback.State;
        }
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
        WarningText.ToDtos(result.Warnings),
        result.Measurements,
        result.Estimates,
        result.DisturbanceEstimates,
        result.EstimatedOutputs);
}
