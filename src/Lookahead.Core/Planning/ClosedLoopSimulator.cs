using Lookahead.Core.Estimation;
using Lookahead.Core.Numerics;
using Lookahead.Core.Validation;

namespace Lookahead.Core.Planning;

/// <summary>Receding-horizon simulation: measure, plan, apply the first move to the (possibly different) true plant, repeat.</summary>
/// <remarks>
/// <para>Sample k, in deviations from the operating point:</para>
/// <list type="number">
/// <item>the true output y_k = C x_k + o_k (o_k the scheduled output disturbance) and the measurement
/// y_k + σ∘z_k (z_k standard normal from <see cref="GaussianNoise"/>, drawn output by output, sample by sample);</item>
/// <item>with feedback from the estimate: x̂⁺(0) is the estimator's steady-state fit to the first measurement with
/// the previous input (zero deviation when none is given) and E v_0, like a station's first sample; afterwards
/// x̂⁻(k) = A_a x̂⁺(k−1) + B_a u_{k−1} + E v_{k−1} and x̂⁺(k) corrects it with measurement k;</item>
/// <item>the plan starts from x_k (feedback from the state) or x̂⁺(k) with d̂⁺(k), holding the measured
/// disturbance v_k over its horizon;</item>
/// <item>x_{k+1} = A x_k + B u_k + E v_k + w_k with the true plant's A and B.</item>
/// </list>
/// </remarks>
public static class ClosedLoopSimulator
{
    /// <summary>Longest run accepted, so one request cannot hold a worker for long.</summary>
    public const int MaxSteps = 10_000;

    /// <summary>
    /// Runs the loop. With an operating point the request and the result are in engineering units (like a plan's);
    /// the loop itself runs in deviations, where the true plant's disturbances w_k, the output disturbance, the
    /// noise and the disturbance estimates add as given (they are offsets).
    /// </summary>
    /// <exception cref="ModelValidationException">A field of the request is invalid, or the loop diverged.</exception>
    public static SimulationResult Simulate(CompiledModel model, SimulationRequest request)
    {
        var (trueA, trueB) = SimulationRequestValidator.Validate(model, request);
        var point = model.OperatingPoint;
        var result = SimulateInDeviations(model, ToDeviations(request, point), trueA, trueB);
        if (!point.IsOrigin)
        {
            AddToRows(result.States, point.State);
            AddToRows(result.Inputs, point.Input);
            AddToRows(result.Outputs, point.Output);
            AddToRows(result.References, point.Output);
            AddToRows(result.Measurements, point.Output);
            AddToRows(result.Estimates, point.State);
            AddToRows(result.EstimatedOutputs, point.Output);
        }

        return result;
    }

    private static void AddToRows(double[][]? rows, double[] offset)
    {
        foreach (var row in rows ?? [])
        {
            OperatingPoint.AddRows(row, offset);
        }
    }

    private static SimulationRequest ToDeviations(SimulationRequest request, OperatingPoint point) => point.IsOrigin ? request : request with
    {
        InitialState = OperatingPoint.Minus(request.InitialState, point.State)!,
        PreviousInput = OperatingPoint.Minus(request.PreviousInput, point.Input),
        References = request.References?.Select(change => change with { Reference = OperatingPoint.Minus(change.Reference, point.Output)! }).ToList(),
        MeasuredDisturbances = request.MeasuredDisturbances?.Select(change => change with { Disturbance = OperatingPoint.Minus(change.Disturbance, point.Disturbance)! }).ToList(),
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
        var measurements = new double[steps + 1][];
        var references = request.References is { Count: > 0 } ? new double[steps][] : null;
        var estimator = request.Feedback == SimulationFeedback.Estimate ? model.Estimator : null;
        var estimates = estimator is null ? null : new double[steps + 1][];
        var disturbanceEstimates = estimator is null ? null : new double[steps + 1][];
        var estimatedOutputs = estimator is null ? null : new double[steps + 1][];
        double[]? augmentedC = estimator is null ? null : DenseMatrix.RowMajor(estimator.AugmentedC);
        double[]? trueE = model.DisturbanceCount > 0 ? DenseMatrix.RowMajor(DenseMatrix.FromRows(model.DiscreteE)) : null;
        var noise = request.MeasurementNoise is { } noiseSpec ? new GaussianNoise(noiseSpec.Seed) : null;
        var warnings = new List<Warning>();
        states[0] = (double[])request.InitialState.Clone();
        double[]? previous = request.PreviousInput;
        double total = 0;
        int nonOptimal = 0;
        int referenceIndex = -1, measuredIndex = -1, offsetIndex = -1;
        var referenceSchedule = request.References ?? [];
        var measuredSchedule = request.MeasuredDisturbances ?? [];
        var offsetSchedule = request.OutputDisturbance ?? [];
        var evaluator = model.Trajectory;
        StateEstimate? posterior = null;
        double[]? previousDrive = null;

        // Consecutive states of a closed loop are alike: each plan starts from the last one's active limits.
        var warmStart = model.CreateWarmStart();

        for (int k = 0; ; k++)
        {
            referenceIndex = Advance(referenceSchedule, referenceIndex, k, c => c.FromStep);
            measuredIndex = Advance(measuredSchedule, measuredIndex, k, c => c.FromStep);
            offsetIndex = Advance(offsetSchedule, offsetIndex, k, c => c.FromStep);
            double[]? disturbance = measuredIndex >= 0 ? measuredSchedule[measuredIndex].Disturbance : null;
            double[]? drive = null;
            if (disturbance is not null && trueE is not null)
            {
                drive = new double[n];
                DenseKernels.Multiply(trueE, disturbance, drive);
            }

            outputs[k] = new double[p];
            evaluator.Output(states[k], outputs[k]);
            if (offsetIndex >= 0)
            {
                DenseKernels.Axpy(1.0, offsetSchedule[offsetIndex].Offset, outputs[k]);
            }

            measurements[k] = Measure(outputs[k], request.MeasurementNoise, noise);
            if (estimator is not null)
            {
                posterior = k == 0
                    ? estimator.Initialise(measurements[k], previous ?? new double[m], drive)
                    : estimator.Correct(estimator.Predict(posterior!, inputs[k - 1], previousDrive), measurements[k]).Estimate;
                estimates![k] = (double[])posterior.State.Clone();
                disturbanceEstimates![k] = (double[])posterior.Disturbance.Clone();
                estimatedOutputs![k] = new double[p];
                DenseKernels.Multiply(augmentedC!, [.. posterior.State, .. posterior.Disturbance], estimatedOutputs[k]);
            }

            if (k == steps)
            {
                break;
            }

            double[]? reference = referenceIndex >= 0 ? referenceSchedule[referenceIndex].Reference : null;
            var planRequest = posterior is null
                ? new PlanRequest(states[k], reference, previous, Disturbance: disturbance is null ? null : [disturbance])
                : new PlanRequest(posterior.State, reference, previous, Disturbance: disturbance is null ? null : [disturbance], DisturbanceEstimate: posterior.Disturbance.Length > 0 ? posterior.Disturbance : null);
            var plan = model.PlanInDeviations(planRequest, warmStart);
            if (plan.Status != PlanStatus.Optimal)
            {
                nonOptimal++;
            }

            var u = plan.Input(0).ToArray();
            inputs[k] = u;
            if (references is not null)
            {
                // A copy: the schedule's row is shared by every step it covers, and the result is shifted row by row afterwards.
                references[k] = reference is null ? new double[p] : (double[])reference.Clone();
            }

            total += evaluator.StageCost(outputs[k], u, reference, plan.Target?.Input, previous);

            var next = new double[n];
            DenseKernels.Multiply(trueA, states[k], next);
            DenseKernels.MultiplyAdd(trueB, u, next);
            if (drive is not null)
            {
                DenseKernels.Axpy(1.0, drive, next);
            }

            if (request.Disturbances is { } w && k < w.Length)
            {
                DenseKernels.Axpy(1.0, w[k], next);
            }

            if (!DenseKernels.AllFinite(next))
            {
                throw new ModelValidationException("steps", $"the closed loop diverged to non-finite values at step {k + 1}; shorten the run or check the true plant");
            }

            states[k + 1] = next;
            previous = u;
            previousDrive = drive;
        }

        if (nonOptimal > 0)
        {
            warnings.Add(new Warning(WarningCode.StepsNotOptimal) { Count = nonOptimal });
        }

        return new SimulationResult(steps, states, inputs, outputs, references, total, nonOptimal, warnings, measurements, estimates, disturbanceEstimates, estimatedOutputs);
    }

    /// <summary>The index of the schedule's change in force at <paramref name="step"/> (−1 before the first), moving on from <paramref name="index"/>.</summary>
    private static int Advance<T>(IReadOnlyList<T> schedule, int index, int step, Func<T, int> fromStep)
    {
        while (index + 1 < schedule.Count && fromStep(schedule[index + 1]) <= step)
        {
            index++;
        }

        return index;
    }

    /// <summary>The true output plus σ_j z for each output j (z drawn even where σ_j = 0, so one output's σ does not shift another's noise).</summary>
    private static double[] Measure(double[] output, MeasurementNoise? spec, GaussianNoise? noise)
    {
        var measurement = (double[])output.Clone();
        if (spec is null || noise is null)
        {
            return measurement;
        }

        for (int j = 0; j < measurement.Length; j++)
        {
            measurement[j] += spec.StandardDeviation[j] * noise.Next();
        }

        return measurement;
    }
}
