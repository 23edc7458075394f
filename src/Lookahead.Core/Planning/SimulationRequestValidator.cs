using Lookahead.Core.Models;
using Lookahead.Core.Numerics;
using Lookahead.Core.Validation;

namespace Lookahead.Core.Planning;

/// <summary>
/// Checks a <see cref="SimulationRequest"/> against its model before the run allocates anything proportional to
/// its length, and discretises the true plant. Every error carries the JSON path of its field.
/// </summary>
internal static class SimulationRequestValidator
{
    /// <summary>Rows of a long array stop being checked once this many errors are listed: a long bad array has said enough by then.</summary>
    private const int MaxListedErrors = 20;

    /// <summary>The true plant's discretised A and B, row-major.</summary>
    /// <exception cref="ModelValidationException">Every invalid field, with its path.</exception>
    public static (double[] A, double[] B) Validate(CompiledModel model, SimulationRequest request)
    {
        var errors = new List<ValidationError>();
        int n = model.StateCount;
        bool stepsValid = request.Steps >= 1 && request.Steps <= ClosedLoopSimulator.MaxSteps;
        if (!stepsValid)
        {
            errors.Add(new("steps", $"must be between 1 and {ClosedLoopSimulator.MaxSteps}"));
        }

        // A schedule holds at most one change per step; the bound keeps a bad request from being walked at length.
        int scheduleBound = stepsValid ? request.Steps : ClosedLoopSimulator.MaxSteps;

        errors.AddRange(model.ValidateRequest(new PlanRequest(request.InitialState, null, request.PreviousInput))
            .Select(e => e.Path.StartsWith("state", StringComparison.Ordinal) ? e with { Path = "initialState" + e.Path["state".Length..] } : e));
        ValidateReferences(model, request.References, errors);
        ValidateStateDisturbances(n, request, errors);

        if (request.MeasuredDisturbances is { } measured)
        {
            if (model.DisturbanceCount == 0)
            {
                errors.Add(new("measuredDisturbances", "the model has no measured disturbances (plant.e)"));
            }
            else
            {
                ValidateSchedule(measured, "measuredDisturbances", "disturbance", model.DisturbanceCount, "one per measured disturbance", scheduleBound, c => c?.FromStep, c => c?.Disturbance, errors);
            }
        }

        if (request.OutputDisturbance is { } offsets)
        {
            ValidateSchedule(offsets, "outputDisturbance", "offset", model.OutputCount, "one per output", scheduleBound, c => c?.FromStep, c => c?.Offset, errors);
        }

        if (request.Feedback == SimulationFeedback.Estimate && model.Estimator is null)
        {
            errors.Add(new("feedback", "\"estimate\" needs a model registered with an estimator; use \"state\" or register the model with one"));
        }
        else if (!Enum.IsDefined(request.Feedback))
        {
            errors.Add(new("feedback", "must be \"state\" or \"estimate\""));
        }

        ValidateNoise(model.OutputCount, request.MeasurementNoise, errors);
        var truePlant = TruePlant(model, request.TruePlant, errors);
        if (errors.Count > 0)
        {
            throw new ModelValidationException(errors);
        }

        return truePlant;
    }

    private static void ValidateReferences(CompiledModel model, IReadOnlyList<ReferenceChange>? schedule, List<ValidationError> errors)
    {
        if (schedule is null)
        {
            return;
        }

        int last = -1;
        for (int i = 0; i < schedule.Count; i++)
        {
            if (schedule[i] is null)
            {
                errors.Add(new($"references[{i}]", "is missing"));
                continue;
            }

            if (schedule[i].FromStep < 0 || schedule[i].FromStep <= last)
            {
                errors.Add(new($"references[{i}].fromStep", "must be ≥ 0 and increase along the schedule"));
            }

            last = schedule[i].FromStep;
            foreach (var e in model.ValidateRequest(new PlanRequest(new double[model.StateCount], schedule[i].Reference)))
            {
                errors.Add(e with { Path = $"references[{i}].{e.Path}" });
            }
        }
    }

    private static void ValidateStateDisturbances(int n, SimulationRequest request, List<ValidationError> errors)
    {
        if (request.Disturbances is not { } w)
        {
            return;
        }

        if (w.Length > request.Steps)
        {
            errors.Add(new("disturbances", $"has {w.Length} rows; at most one per step ({request.Steps})"));
            return;
        }

        for (int k = 0; k < w.Length && errors.Count < MaxListedErrors; k++)
        {
            if (w[k] is null || w[k].Length != n)
            {
                errors.Add(new($"disturbances[{k}]", $"must have {n} entries"));
            }
            else if (w[k].Any(v => !double.IsFinite(v)))
            {
                errors.Add(new($"disturbances[{k}]", "must contain finite numbers only"));
            }
        }
    }

    /// <summary>A schedule of changes {fromStep, vector}: at most <paramref name="bound"/> entries, steps ≥ 0 and increasing, vectors of <paramref name="width"/> finite numbers.</summary>
    private static void ValidateSchedule<T>(
        IReadOnlyList<T> schedule, string path, string vectorName, int width, string meaning, int bound,
        Func<T, int?> fromStep, Func<T, double[]?> vector, List<ValidationError> errors)
    {
        if (schedule.Count > bound)
        {
            errors.Add(new(path, $"has {schedule.Count} changes; at most one per step ({bound})"));
            return;
        }

        int last = -1;
        int listed = errors.Count;
        for (int i = 0; i < schedule.Count && errors.Count - listed < MaxListedErrors; i++)
        {
            int? from = fromStep(schedule[i]);
            if (from is null)
            {
                errors.Add(new($"{path}[{i}]", "is missing"));
                continue;
            }

            if (from < 0 || from <= last)
            {
                errors.Add(new($"{path}[{i}].fromStep", "must be ≥ 0 and increase along the schedule"));
            }

            last = from.Value;
            var values = vector(schedule[i]);
            if (values is null || values.Length != width)
            {
                errors.Add(new($"{path}[{i}].{vectorName}", $"must have {width} entries ({meaning})"));
            }
            else if (values.Any(v => !double.IsFinite(v)))
            {
                errors.Add(new($"{path}[{i}].{vectorName}", "must contain finite numbers only"));
            }
        }
    }

    private static void ValidateNoise(int p, MeasurementNoise? noise, List<ValidationError> errors)
    {
        if (noise is null)
        {
            return;
        }

        const string path = "measurementNoise.standardDeviation";
        if (noise.StandardDeviation is null || noise.StandardDeviation.Length != p)
        {
            errors.Add(new(path, $"must have {p} entries (one per output)"));
            return;
        }

        for (int j = 0; j < p; j++)
        {
            double sigma = noise.StandardDeviation[j];
            if (!double.IsFinite(sigma) || sigma < 0)
            {
                errors.Add(new($"{path}[{j}]", "must be a finite number ≥ 0"));
            }
        }
    }

    private static (double[] A, double[] B) TruePlant(CompiledModel model, PlantSpec? plant, List<ValidationError> errors)
    {
        int n = model.StateCount;
        double[] trueA = DenseMatrix.RowMajor(DenseMatrix.FromRows(model.DiscreteA));
        double[] trueB = DenseMatrix.RowMajor(DenseMatrix.FromRows(model.DiscreteB));
        if (plant is null)
        {
            return (trueA, trueB);
        }

        if (!Shaped(plant.A, n, n) || !Shaped(plant.B, n, model.InputCount))
        {
            errors.Add(new("truePlant", $"a must be {n}×{n} and b {n}×{model.InputCount}, like the model"));
            return (trueA, trueB);
        }

        if (plant.A.Concat(plant.B).SelectMany(row => row).Any(v => !double.IsFinite(v)))
        {
            errors.Add(new("truePlant", "must contain finite numbers only"));
            return (trueA, trueB);
        }

        var a = DenseMatrix.FromRows(plant.A);
        var b = DenseMatrix.FromRows(plant.B);
        if (plant.TimeDomain == TimeDomain.Continuous)
        {
            try
            {
                (a, b) = ZeroOrderHold.Discretise(a, b, model.SampleTime);
            }
            catch (ArgumentException ex)
            {
                errors.Add(new("truePlant", $"cannot be discretised at the model's sample time: {ex.Message}"));
            }
        }

        return (DenseMatrix.RowMajor(a), DenseMatrix.RowMajor(b));
    }

    private static bool Shaped(double[][]? rows, int r, int c) => rows is not null && rows.Length == r && rows.All(row => row is not null && row.Length == c);
}
