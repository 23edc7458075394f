using System.Buffers;
using Lookahead.Core.Numerics;
using Lookahead.Core.Validation;

namespace Lookahead.Core.Planning;

/// <summary>
/// Plans with a reference schedule or measured disturbances (<see cref="PlanRequest.HasPreview"/>).
/// <para>
/// The cached gains answer the problem with the last setpoint r̄ held, no disturbance and the target (x_s, u_s) of
/// (r̄, v̄). The true problem differs from it only in its linear term (the per-stage r_k and the drive E v_k enter J
/// linearly in U), so one Newton step from the gains' answer, U ← U − H⁻¹g with g the adjoint gradient of the true
/// J on the true trajectory, is its exact minimiser; an ill-conditioned model takes the same refinement steps as
/// any plan. Limits then start from that optimum, with the output rows moved by C d_k, d_k the disturbance's free
/// response. This costs one rollout, one adjoint sweep and two triangular solves beyond the plain plan, and no
/// cached map grows with the preview (an N·m × N·(p + q) map per variant would, and would be refused for the
/// largest models).
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

        var references = Expand(request.ReferenceSchedule ?? (request.Reference is { } r ? [r] : null), p, horizon);
        var disturbance = request.FinalDisturbance;
        var drives = Drives(request.Disturbance, n, q, horizon);

        // The target: for the last setpoint (zero without one) and the last disturbance row.
        var finalReference = request.FinalReference ?? new double[p];
        var targetState = new double[n];
        var targetInput = new double[m];
        bool limited = PreviewTargets(finalReference, disturbance, targetState, targetInput, warnings);
        plan.Target = MakeTarget(finalReference, targetState, targetInput, limited);
        if (!plan.Target.ReferenceReached && (request.FinalReference is not null || disturbance is not null))
        {
            warnings.Add(new Warning(limited ? WarningCode.SetpointOutsideInputLimits : WarningCode.SetpointUnreachable) { Amount = plan.Target.OutputError });
        }

        // The gains' answer for r̄ held and no disturbance, then the exact step to the true problem.
        gains.Apply(request.State, finalReference, targetState, targetInput, request.PreviousInput, plan.Inputs);
        var stageReferences = new StageReferences(references, references.Length == 0 ? 0 : p);
        var gradient = ArrayPool<double>.Shared.Rent(DecisionVariables);
        try
        {
            var g = gradient.AsSpan(0, DecisionVariables);
            for (int pass = 0; pass < (refine ? RefinementSteps : 1); pass++)
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
            var offsets = OutputOffsets(drives, n, p, horizon);
            var outcome = constrained.Solve(plan.Inputs, request.State, request.PreviousInput, Options.SoftLimitLinearWeight, MaxSolverIterations, WarmWorkspace(warmStart, constrained), offsets);
            plan.Status = outcome.Status;
            plan.Iterations = outcome.Iterations;
            plan.ActiveLimits = outcome.ActiveLimits;
            warnings.AddRange(outcome.Warnings);
            plan.Cost = trajectory.Evaluate(plan, request.State, stageReferences, drives, targetState, targetInput, request.PreviousInput);
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
    /// x_s and u_s for (r̄, v̄) from the target maps. Without a disturbance the limited target applies as for any plan;
    /// with one, a target whose inputs break their limits is kept and flagged (the limited target does not take a
    /// disturbance yet). Returns whether the input limits moved the target.
    /// </summary>
    private bool PreviewTargets(double[] reference, double[]? disturbance, Span<double> targetState, Span<double> targetInput, List<Warning> warnings)
    {
        if (disturbance is null)
        {
            return Targets(reference, targetState, targetInput);
        }

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

        if (targetSolver is not null)
        {
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
        }

        return false;
    }

    private static double DualActiveSetSolverTolerance(ValidatedLimits limits) =>
        Optimization.DualActiveSetSolver.FeasibilityTolerance * (1 + limits.InputMin.Concat(limits.InputMax).Where(double.IsFinite).Select(Math.Abs).DefaultIfEmpty(0).Max());

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

    /// <summary>C d_k for k = 0 … N ((N+1) rows of p), d_0 = 0, d_{k+1} = A d_k + w_k; empty without a disturbance.</summary>
    private double[] OutputOffsets(double[] drives, int n, int p, int horizon)
    {
        if (drives.Length == 0)
        {
            return [];
        }

        var offsets = new double[(horizon + 1) * p];
        var d = new double[n];
        var next = new double[n];
        var noInput = new double[InputCount];
        for (int k = 0; k < horizon; k++)
        {
            trajectory.Step(d, noInput, next);
            DenseKernels.Axpy(1.0, drives.AsSpan(k * n, n), next);
            (d, next) = (next, d);
            trajectory.Output(d, offsets.AsSpan((k + 1) * p, p));
        }

        return offsets;
    }
}
