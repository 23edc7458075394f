using Lookahead.Core.Models;
using Lookahead.Core.Numerics;
using Lookahead.Core.Validation;

namespace Lookahead.Core.Planning;

/// <summary>Receding-horizon simulation: plan, apply the first move to the (possibly different) true plant, repeat.</summary>
public static class ClosedLoopSimulator
{
    /// <summary>Longest run accepted, so one request cannot hold a worker for long.</summary>
    public const int MaxSteps = 10_000;

    /// <summary>Disturbance rows stop being checked once this many errors are listed: a long bad array has said enough by then.</summary>
    private const int MaxListedErrors = 20;

    /// <summary>
    /// Runs the loop. With an operating point the request and the result are in engineering units (like a plan's);
    /// the loop itself runs in deviations, where the true plant's disturbances w_k add as given.
    /// </summary>
    /// <exception cref="ModelValidationException">A field of the request is invalid.</exception>
    public static SimulationResult Simulate(CompiledModel model, SimulationRequest request)
    {
        var (trueA, trueB) = Validate(model, request);
        var point = model.OperatingPoint;
        var result = SimulateInDeviations(model, ToDeviations(request, point), trueA, trueB);
        if (!point.IsOrigin)
        {
            foreach (var row in result.States)
            {
                OperatingPoint.AddRows(row, point.State);
            }

            foreach (var row in result.Inputs)
            {
                OperatingPoint.AddRows(row, point.Input);
            }

            foreach (var row in result.Outputs)
            {
                OperatingPoint.AddRows(row, point.Output);
            }

            foreach (var row in result.References ?? [])
            {
                OperatingPoint.AddRows(row, point.Output);
            }
        }

        return result;
    }

    private static SimulationRequest ToDeviations(SimulationRequest request, OperatingPoint point) => point.IsOrigin ? request : request with
    {
        InitialState = OperatingPoint.Minus(request.InitialState, point.State)!,
        PreviousInput = OperatingPoint.Minus(request.PreviousInput, point.Input),
        References = request.References?.Select(change => change with { Reference = OperatingPoint.Minus(change.Reference, point.Output)! }).ToList(),
    };

    private static SimulationResult SimulateInDeviations(CompiledModel model, SimulationRequest request, double[] trueA, double[] trueB)
    {
        int n = model.StateCount;
        int m = model.InputCount;
        int p = model.OutputCount;
        int steps = request.Steps;
        var states = new double[steps + 1][];
        var inputs = new double[steps][];
        var outputs = new double[steps + 1][];
        var references = request.References is { Count: > 0 } ? new double[steps][] : null;
        var warnings = new List<Warning>();
        states[0] = (double[])request.InitialState.Clone();
        double[]? previous = request.PreviousInput;
        double total = 0;
        int nonOptimal = 0;
        int scheduleIndex = -1;
        var schedule = request.References ?? [];
        var evaluator = model.Trajectory;

        // Consecutive states of a closed loop are alike: each plan starts from the last one's active limits.
        var warmStart = model.CreateWarmStart();

        for (int k = 0; k < steps; k++)
        {
            while (scheduleIndex + 1 < schedule.Count && schedule[scheduleIndex + 1].FromStep <= k)
            {
                scheduleIndex++;
            }

            double[]? reference = scheduleIndex >= 0 ? schedule[scheduleIndex].Reference : null;
            var plan = model.PlanInDeviations(new PlanRequest(states[k], reference, previous), warmStart);
            if (plan.Status != PlanStatus.Optimal)
            {
                nonOptimal++;
            }

            var u = plan.Input(0).ToArray();
            inputs[k] = u;
            if (references is not null)
            {
                references[k] = reference ?? new double[p];
            }

            outputs[k] = new double[p];
            evaluator.Output(states[k], outputs[k]);
            total += evaluator.StageCost(outputs[k], u, reference, plan.Target?.Input, previous);

            var next = new double[n];
            DenseKernels.Multiply(trueA, states[k], next);
            DenseKernels.MultiplyAdd(trueB, u, next);
            if (request.Disturbances is { } w && k < w.Length)
            {
                for (int i = 0; i < n; i++)
                {
                    next[i] += w[k][i];
                }
            }

            if (next.Any(v => !double.IsFinite(v)))
            {
                throw new ModelValidationException("steps", $"the closed loop diverged to non-finite values at step {k + 1}; shorten the run or check the true plant");
            }

            states[k + 1] = next;
            previous = u;
        }

        outputs[steps] = new double[p];
        evaluator.Output(states[steps], outputs[steps]);
        if (nonOptimal > 0)
        {
            warnings.Add(new Warning(WarningCode.StepsNotOptimal) { Count = nonOptimal });
        }

        return new SimulationResult(steps, states, inputs, outputs, references, total, nonOptimal, warnings);
    }

    private static (double[] A, double[] B) Validate(CompiledModel model, SimulationRequest request)
    {
        var errors = new List<ValidationError>();
        int n = model.StateCount;
        if (request.Steps < 1 || request.Steps > MaxSteps)
        {
            errors.Add(new("steps", $"must be between 1 and {MaxSteps}"));
        }

        errors.AddRange(model.ValidateRequest(new PlanRequest(request.InitialState, null, request.PreviousInput))
            .Select(e => e.Path.StartsWith("state", StringComparison.Ordinal) ? e with { Path = "initialState" + e.Path["state".Length..] } : e));
        if (request.References is { } schedule)
        {
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
                foreach (var e in model.ValidateRequest(new PlanRequest(new double[n], schedule[i].Reference)))
                {
                    errors.Add(e with { Path = $"references[{i}].{e.Path}" });
                }
            }
        }

        if (request.Disturbances is { } w)
        {
            if (w.Length > request.Steps)
            {
                errors.Add(new("disturbances", $"has {w.Length} rows; at most one per step ({request.Steps})"));
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

        double[] trueA = DenseMatrix.RowMajor(DenseMatrix.FromRows(model.DiscreteA));
        double[] trueB = DenseMatrix.RowMajor(DenseMatrix.FromRows(model.DiscreteB));
        if (request.TruePlant is { } plant)
        {
            var plantErrors = new List<ValidationError>();
            if (!Shaped(plant.A, n, n) || !Shaped(plant.B, n, model.InputCount))
            {
                plantErrors.Add(new("truePlant", $"a must be {n}×{n} and b {n}×{model.InputCount}, like the model"));
            }
            else if (plant.A.Concat(plant.B).SelectMany(row => row).Any(v => !double.IsFinite(v)))
            {
                plantErrors.Add(new("truePlant", "must contain finite numbers only"));
            }

            errors.AddRange(plantErrors);
            if (plantErrors.Count == 0)
            {
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

                trueA = DenseMatrix.RowMajor(a);
                trueB = DenseMatrix.RowMajor(b);
            }
        }

        if (errors.Count > 0)
        {
            throw new ModelValidationException(errors);
        }

        return (trueA, trueB);
    }

    private static bool Shaped(double[][]? rows, int r, int c) => rows is not null && rows.Length == r && rows.All(row => row is not null && row.Length == c);
}
