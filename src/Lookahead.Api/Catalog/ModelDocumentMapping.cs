using Lookahead.Core.Models;
using Lookahead.Core.Validation;

namespace Lookahead.Api.Catalog;

/// <summary>
/// The one mapping between the wire document and the core's types (both directions). Fields the core gives defaults for are required here when a
/// silent default would change the model's meaning (the time domain) or is not representable (missing numbers).
/// </summary>
public static class ModelDocumentMapping
{
    /// <summary>Makes defaults explicit so that omitting a default and stating it hash the same.</summary>
    public static ModelDocumentDto Normalise(ModelDocumentDto dto) => dto with
    {
        Cost = dto.Cost is null ? null : dto.Cost with { TerminalWeight = dto.Cost.TerminalWeight ?? TerminalWeightDto.Riccati },
        Limits = dto.Limits is { IsEmpty: true } ? null : dto.Limits,
        Labels = NormaliseLabels(dto.Labels),
        OperatingPoint = dto.OperatingPoint is { IsEmpty: true } ? null : dto.OperatingPoint,
        Estimator = dto.Estimator is null ? null : dto.Estimator with { DisturbanceModel = dto.Estimator.DisturbanceModel ?? "output" },
    };

    /// <summary>Empty units and then empty labels become absent, so that they hash like documents without them.</summary>
    private static LabelsDto? NormaliseLabels(LabelsDto? labels)
    {
        var withUnits = labels is null ? null : labels with { Units = labels.Units is { IsEmpty: true } ? null : labels.Units };
        return withUnits is { IsEmpty: true } ? null : withUnits;
    }

    public static ModelDocument ToCore(ModelDocumentDto dto, List<ValidationError> errors)
    {
        PlantSpec plant = null!;
        if (dto.Plant is { } p)
        {
            if (p.SampleTime is null)
            {
                errors.Add(new("plant.sampleTime", "is required (seconds between moves)"));
            }

            var domain = ParseTimeDomain(p.TimeDomain, "plant.timeDomain", errors);
            plant = new PlantSpec(p.A!, p.B!, p.C, p.SampleTime ?? double.NaN, domain, p.E);
        }

        CostSpec cost = null!;
        if (dto.Cost is { } c)
        {
            if (c.Horizon is null)
            {
                errors.Add(new("cost.horizon", "is required (number of moves planned)"));
            }

            cost = new CostSpec(
                c.Horizon ?? 0,
                ToWeight(c.OutputWeight)!,
                ToWeight(c.InputWeight)!,
                ToWeight(c.InputRateWeight),
                ToTerminal(c.TerminalWeight, errors));
        }

        LimitsSpec? limits = dto.Limits is { } l
            ? new LimitsSpec(l.InputMin, l.InputMax, l.InputRateMin, l.InputRateMax, l.OutputMin, l.OutputMax, l.OutputViolationWeight)
            : null;
        LabelsSpec? labels = dto.Labels is { } names
            ? new LabelsSpec(names.States, names.Inputs, names.Outputs, names.Units is { } units ? new UnitsSpec(units.States, units.Inputs, units.Outputs, units.Disturbances) : null, names.Disturbances)
            : null;
        var point = dto.OperatingPoint is { } op ? new OperatingPointSpec(op.State, op.Input, op.Output, op.Disturbance) : null;
        var estimator = dto.Estimator is { } e ? ToEstimator(e, errors) : null;
        return new ModelDocument(dto.Name, plant, cost, limits, labels, point, estimator);
    }

    private static Lookahead.Core.Estimation.EstimatorSpec ToEstimator(EstimatorDto dto, List<ValidationError> errors)
    {
        var kind = dto.DisturbanceModel switch
        {
            null or "output" => Lookahead.Core.Estimation.DisturbanceModelKind.Output,
            "input" => Lookahead.Core.Estimation.DisturbanceModelKind.Input,
            "none" => Lookahead.Core.Estimation.DisturbanceModelKind.None,
            _ => Invalid(),
        };
        return new Lookahead.Core.Estimation.EstimatorSpec(ToWeight(dto.ProcessNoise), ToWeight(dto.MeasurementNoise), kind);

        Lookahead.Core.Estimation.DisturbanceModelKind Invalid()
        {
            errors.Add(new("estimator.disturbanceModel", "must be 'output', 'input' or 'none'"));
            return Lookahead.Core.Estimation.DisturbanceModelKind.Output;
        }
    }

    public static TimeDomain ParseTimeDomain(string? value, string path, List<ValidationError> errors)
    {
        switch (value)
        {
            case "discrete":
                return TimeDomain.Discrete;
            case "continuous":
                return TimeDomain.Continuous;
            case null:
                errors.Add(new(path, "is required: 'discrete' or 'continuous'"));
                return TimeDomain.Discrete;
            default:
                errors.Add(new(path, "must be 'discrete' or 'continuous'"));
                return TimeDomain.Discrete;
        }
    }

    public static string TimeDomainName(TimeDomain domain) => domain == TimeDomain.Continuous ? "continuous" : "discrete";

    private static WeightSpec? ToWeight(WeightDto? weight) => weight switch
    {
        null => null,
        { Matrix: { } matrix } => WeightSpec.FromMatrix(matrix),
        { Diagonal: { } diagonal } => WeightSpec.FromDiagonal(diagonal),
        _ => null,
    };

    private static TerminalWeightSpec? ToTerminal(TerminalWeightDto? terminal, List<ValidationError> errors)
    {
        switch (terminal)
        {
            case null:
                return null;
            case { Matrix: { } matrix }:
                return new TerminalWeightSpec(TerminalWeightKind.Explicit, matrix);
            case { Kind: "riccati" }:
                return TerminalWeightSpec.Riccati;
            case { Kind: "stage" }:
                return TerminalWeightSpec.Stage;
            default:
                errors.Add(new("cost.terminalWeight", "must be 'riccati', 'stage' or an n×n matrix"));
                return null;
        }
    }
}
