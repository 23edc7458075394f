using System.Buffers;
using Lookahead.Core.Numerics;
using Lookahead.Core.Validation;

namespace Lookahead.Core.Planning;

/// <summary>
/// Plans with a reference schedule, measured disturbances or an estimate's disturbance (<see cref="PlanRequest.HasPreview"/>).
/// <para>
/// The per-stage r_k and the drive E v_k enter J linearly in U, so the unconstrained optimum stays a product with
/// cached maps: the model's gains with the target (x_s, u_s) of the last rows (r̄, v̄), plus the stacked-preview maps
/// K_R, K_V (<see cref="PreviewMaps"/>). Where those maps would be too large, and for an input-disturbance estimate
/// (whose drive B d̂ has no map), one Newton step from the gains' answer for r̄ held, U ← U − H⁻¹g with g the adjoint
/// gradient of the true J on the true trajectory, reaches the same exact minimiser for one rollout, one adjoint
/// sweep and two triangular solves. Limits then start from that optimum, with the output rows moved by C d_k,
/// d_k the disturbance's free response.
/// </para>
/// </summary>
public sealed partial class CompiledModel
{
    /// <summary>A steady state balances v̄ when (A − I)x_s + B u_s + E v̄ is within this of zero, relative to the data's scale.</summary>
    private const double BalanceTolerance = 1e-9;

    private Plan PlanWithPreview(PlanRequest request, PlanWarmStart? warmStart)
    {
        if (!IsWellFormed(request))
        {
            throw new ModelValidationException(ValidateRequest(request));
        }

        int n = StateCount;
        int m = InputCount;
        int p = OutputCount;
        int q = DisturbanceCount;
        int horizon = Horizon;
        var plan = new Plan(horizon, n, m, p);
        var gains = request.PreviousInput is null ? withoutPrevious : withPrevious;
        var warnings = new List<Warning>();

        // An estimate's disturbance: a bias on every predicted output (output model) or an input offset (input model).
        var (outputBias, inputShift) = EstimateOffsets(request.DisturbanceEstimate);
        var references = ShiftRows(Expand(request.ReferenceSchedule ?? (request.Reference is { } r ? [r] : null), p, horizon), outputBias, p, horizon);
        var disturbance = request.FinalDisturbance;
        var drives = AddInputShift(Drives(request.Disturbance, n, q, horizon), inputShift, n, horizon);

        // The target: for the last setpoint (zero without one) and the last disturbance row, against the estimate.
        var finalReference = request.FinalReference ?? new double[p];
        var shiftedReference = outputBias is null ? finalReference : OperatingPoint.Minus(finalReference, outputBias)!;
        var targetState = new double[n];
        var targetInput = new double[m];
        bool limited = PreviewTargets(shiftedReference, disturbance, inputShift, targetState, targetInput, warnings);
        plan.Target = MakeTarget(shiftedReference, targetState, targetInput, limited);
        if (outputBias is not null)
        {
            plan.Target = plan.Target with { Output = OperatingPoint.Plus(plan.Target.Output, outputBias) };
        }

        if (!plan.Target.ReferenceReached && (request.FinalReference is not null || disturbance is not null || request.DisturbanceEstimate is not null))
        {
            warnings.Add(new Warning(limited ? WarningCode.SetpointOutsideInputLimits : WarningCode.SetpointUnreachable) { Amount = plan.Target.OutputError });
        }

        // With the stacked-preview maps: a product, U* = −(K z + K_R R + K_V V) (z with r = 0: the schedule is in R).
        // Without them (a large model, or an input disturbance estimate): the gains' answer for r̄ held and no
        // disturbance, then the exact Newton step to the true problem. Ill-conditioned models refine either.
        var stageReferences = new StageReferences(references, references.Length == 0 ? 0 : p);
        var maps = inputShift is null ? PreviewFor(request.PreviousInput is not null) : null;
        int newtonSteps = refine ? RefinementSteps : 1;
        if (maps is not null)
        {
            gains.Apply(request.State, new double[p], targetState, targetInput, request.PreviousInput, plan.Inputs);
            maps.Apply(references, Expand(request.Disturbance, q, horizon), plan.Inputs);
            newtonSteps = refine ? RefinementSteps : 0;
        }
        else
        {
            gains.Apply(request.State, shiftedReference, targetState, targetInput, request.PreviousInput, plan.Inputs);
        }

        var gradient = ArrayPool<double>.Shared.Rent(DecisionVariables);
        try
        {
            var g = gradient.AsSpan(0, DecisionVariables);
            for (int pass = 0; pass < newtonSteps; pass++)
            {
                trajectory.Evaluate(plan, request.State, stageReferences, drives, targetState, targetInput, request.PreviousInput);
                trajectory.Gradient(plan.Inputs, plan.States, plan.Outputs, horizon, stageReferences, targetState, targetInput, request.PreviousInput, g);
                gains.Factor.Solve(g);
                DenseKernels.Axpy(-1.0, g, plan.Inputs);
            }
        }
        finally
        {
            ArrayPool<double>.Shared.Return(gradient);
        }

        var constrained = request.PreviousInput is null ? constrainedWithoutPrevious : constrainedWithPrevious;
        if (constrained is not null)
        {
            var offsets = OutputOffsets(drives, outputBias, n, p, horizon);
            var outcome = constrained.Solve(plan.Inputs, request.State, request.PreviousInput, Options.SoftLimitLinearWeight, MaxSolverIterations, WarmWorkspace(warmStart, constrained), offsets);
            plan.Status = outcome.Status;
            plan.Iterations = outcome.Iterations;
            plan.ActiveLimits = outcome.ActiveLimits;
            warnings.AddRange(outcome.Warnings);
            plan.Cost = trajectory.Evaluate(plan, request.State, stageReferences, drives, targetState, targetInput, request.PreviousInput);
            AddBias(plan.Outputs, outputBias);
            var (violation, violationWarning) = constrained.SoftLimits.Violation(plan.Outputs, p);
            plan.MaxOutputViolation = violation;
            if (violationWarning is not null)
            {
                warnings.Add(violationWarning);
                plan.SoftLimitPenalty = outcome.Penalty;
            }
        }
        else
        {
            plan.Cost = trajectory.Evaluate(plan, request.State, stageReferences, drives, targetState, targetInput, request.PreviousInput);
            AddBias(plan.Outputs, outputBias);
        }

        if (warnings.Count > 0)
        {
            plan.Warnings = warnings;
        }

        if (!double.IsFinite(plan.Cost) || !DenseKernels.AllFinite(plan.Inputs) || !DenseKernels.AllFinite(plan.States) || !DenseKernels.AllFinite(plan.Outputs))
        {
            throw Overflow(request, gains);
        }

        return plan;
    }

    /// <summary>
    /// x_s and u_s for (r̄, v̄) from the target maps, replaced by the limited target when they break an input limit
    /// (with or without a disturbance). Returns whether the input limits moved the target.
    /// </summary>
    private bool PreviewTargets(double[] reference, double[]? disturbance, double[]? inputShift, Span<double> targetState, Span<double> targetInput, List<Warning> warnings)
    {
        if (disturbance is null && inputShift is null)
        {
            return Targets(reference, targetState, targetInput);
        }

        disturbance ??= new double[DisturbanceCount];

        DenseKernels.Multiply(targets.StateMap, reference, targetState);
        DenseKernels.Multiply(targets.InputMap, reference, targetInput);
        Span<double> extra = stackalloc double[Math.Max(StateCount, InputCount)];
        DenseKernels.Multiply(targets.DisturbanceStateMap, disturbance, extra[..StateCount]);
        DenseKernels.Axpy(1.0, extra[..StateCount], targetState);
        DenseKernels.Multiply(targets.DisturbanceInputMap, disturbance, extra[..InputCount]);
        DenseKernels.Axpy(1.0, extra[..InputCount], targetInput);

        // Balance: (A − I)x_s + B u_s + E v̄ = 0 unless E v̄ lies outside what a steady state can absorb.
        double worst = 0;
        double scale = 1;
        for (int i = 0; i < StateCount; i++)
        {
            double residual = -targetState[i];
            for (int j = 0; j < StateCount; j++)
            {
                residual += DiscreteA[i][j] * targetState[j];
                scale = Math.Max(scale, Math.Abs(DiscreteA[i][j] * targetState[j]));
            }

            for (int j = 0; j < InputCount; j++)
            {
                residual += DiscreteB[i][j] * targetInput[j];
                scale = Math.Max(scale, Math.Abs(DiscreteB[i][j] * targetInput[j]));
            }

            for (int j = 0; j < DisturbanceCount; j++)
            {
                residual += DiscreteE[i][j] * disturbance[j];
                scale = Math.Max(scale, Math.Abs(DiscreteE[i][j] * disturbance[j]));
            }

            worst = Math.Max(worst, Math.Abs(residual));
        }

        if (worst > BalanceTolerance * scale)
        {
            warnings.Add(new Warning(WarningCode.DisturbanceNotBalanced) { Amount = worst });
        }

        // An input disturbance d̂ adds to every input: the plant holds u_s + d̂, so the target input is u_s − d̂. The
        // offset-free test passed only when that target is unique, so no tie-break is disturbed by the shift.
        for (int i = 0; inputShift is not null && i < InputCount; i++)
        {
            targetInput[i] -= inputShift[i];
        }

        if (targetSolver is null)
        {
            return false;
        }

        if (inputShift is null)
        {
            // The limited target takes the disturbance: the same lexicographic rule over x = A x + B u + E v̄ inside the limits.
            return targetSolver.Limit(reference, targetState, targetInput, disturbance);
        }

        // An input-disturbance estimate shifts the inputs the plant holds; a target it pushes outside the limits is
        // kept and flagged (the limited target is not shifted by it).
        double excess = 0;
        var limits = model.Limits;
        for (int i = 0; i < InputCount; i++)
        {
            excess = Math.Max(excess, Math.Max(limits.InputMin[i] - targetInput[i], targetInput[i] - limits.InputMax[i]));
        }

        if (excess > DualActiveSetSolverTolerance(limits))
        {
            warnings.Add(new Warning(WarningCode.DisturbanceTargetOutsideInputLimits) { Amount = excess });
        }

        return false;
    }

    private static double DualActiveSetSolverTolerance(ValidatedLimits limits) =>
        Optimization.DualActiveSetSolver.FeasibilityTolerance * (1 + limits.InputMin.Concat(limits.InputMax).Where(double.IsFinite).Select(Math.Abs).DefaultIfEmpty(0).Max());

    /// <summary>(C_d d̂, null) for an output disturbance model, (null, d̂) for an input one, (null, null) without an estimate.</summary>
    private (double[]? OutputBias, double[]? InputShift) EstimateOffsets(double[]? disturbanceEstimate)
    {
        if (disturbanceEstimate is null || Estimator is null)
        {
            return (null, null);
        }

        return Estimator.DisturbanceModel switch
        {
            Estimation.DisturbanceModelKind.Output => (disturbanceEstimate, null),
            Estimation.DisturbanceModelKind.Input => (null, disturbanceEstimate),
            _ => (null, null),
        };
    }

    /// <summary>r_k − bias for every stage (N rows of p); with a bias and no setpoint, −bias.</summary>
    private static double[] ShiftRows(double[] rows, double[]? bias, int p, int horizon)
    {
        if (bias is null)
        {
            return rows;
        }

        var shifted = rows.Length == 0 ? new double[horizon * p] : rows;
        for (int k = 0; k < horizon; k++)
        {
            for (int j = 0; j < p; j++)
            {
                shifted[(k * p) + j] -= bias[j];
            }
        }

        return shifted;
    }

    /// <summary>Adds B d̂ to every step's drive (making the drives when there were none).</summary>
    private double[] AddInputShift(double[] drives, double[]? inputShift, int n, int horizon)
    {
        if (inputShift is null)
        {
            return drives;
        }

        var result = drives.Length == 0 ? new double[horizon * n] : drives;
        Span<double> shift = stackalloc double[n];
        shift.Clear();
        for (int i = 0; i < n; i++)
        {
            for (int j = 0; j < InputCount; j++)
            {
                shift[i] += DiscreteB[i][j] * inputShift[j];
            }
        }

        for (int k = 0; k < horizon; k++)
        {
            DenseKernels.Axpy(1.0, shift, result.AsSpan(k * n, n));
        }

        return result;
    }

    private static void AddBias(Span<double> outputs, double[]? bias)
    {
        if (bias is not null)
        {
            OperatingPoint.AddRows(outputs, bias);
        }
    }

    /// <summary>1…N rows of width <paramref name="width"/> as N rows, the last one held; empty for none.</summary>
    private static double[] Expand(double[][]? rows, int width, int horizon)
    {
        if (rows is null || rows.Length == 0)
        {
            return [];
        }

        var expanded = new double[horizon * width];
        for (int k = 0; k < horizon; k++)
        {
            rows[Math.Min(k, rows.Length - 1)].CopyTo(expanded, k * width);
        }

        return expanded;
    }

    /// <summary>w_k = E v_k for k = 0 … N−1 (N rows of n), the last forecast row held; empty without a disturbance.</summary>
    private double[] Drives(double[][]? rows, int n, int q, int horizon)
    {
        if (rows is null || q == 0)
        {
            return [];
        }

        var drives = new double[horizon * n];
        for (int k = 0; k < horizon; k++)
        {
            var v = rows[Math.Min(k, rows.Length - 1)];
            DenseKernels.MultiplyAddColumns(eColumnMajor, v, drives.AsSpan(k * n, n));
        }

        return drives;
    }

    /// <summary>C d_k + bias for k = 0 … N ((N+1) rows of p), d_0 = 0, d_{k+1} = A d_k + w_k; empty with neither.</summary>
    private double[] OutputOffsets(double[] drives, double[]? bias, int n, int p, int horizon)
    {
        if (drives.Length == 0 && bias is null)
        {
            return [];
        }

        var offsets = new double[(horizon + 1) * p];
        if (bias is not null)
        {
            OperatingPoint.AddRows(offsets, bias);
        }

        if (drives.Length == 0)
        {
            return offsets;
        }

        var d = new double[n];
        var next = new double[n];
        var y = new double[p];
        var noInput = new double[InputCount];
        for (int k = 0; k < horizon; k++)
        {
            trajectory.Step(d, noInput, next);
            DenseKernels.Axpy(1.0, drives.AsSpan(k * n, n), next);
            (d, next) = (next, d);
            trajectory.Output(d, y);
            DenseKernels.Axpy(1.0, y, offsets.AsSpan((k + 1) * p, p));
        }

        return offsets;
    }
}
