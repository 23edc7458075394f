using Lookahead.Core.Models;
using Lookahead.Core.Numerics;
using Lookahead.Core.Optimization;
using Lookahead.Core.Validation;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// A model ready to answer plans. For y_k = C x_k, x_0 the measured state and horizon N it minimises
/// <code>
/// J = Σ_{k=0}^{N−1} [ (y_k − r)ᵀQ(y_k − r) + (u_k − u_s)ᵀR(u_k − u_s) + Δu_kᵀSΔu_k ] + (x_N − x_s)ᵀP(x_N − x_s)
/// </code>
/// subject to x_{k+1} = A x_k + B u_k, with Δu_k = u_k − u_{k−1} (the Δu_0 term only when the previous input is given).
/// Under soft output limits the solve adds a penalty for their violation; it is reported apart from J
/// (<see cref="Planning.Plan.SoftLimitPenalty"/>), never inside it.
/// Immutable and safe to share between threads: every plan works on its own result and stack space.
/// </summary>
public sealed partial class CompiledModel
{
    private readonly ValidatedModel model;
    private readonly GainSet withoutPrevious;
    private readonly GainSet withPrevious;
    private readonly TargetMap targets;
    private readonly TrajectoryEvaluator trajectory;
    private readonly bool refine;
    private readonly ConstrainedProblem? constrainedWithoutPrevious;
    private readonly ConstrainedProblem? constrainedWithPrevious;
    private readonly TargetSolver? targetSolver;
    private readonly InteriorPointProblem? interiorPoint;
    private double[][] discreteE = [];
    private double[] eColumnMajor = [];
    private PreviewMaps? previewWithout;
    private PreviewMaps? previewWith;

    /// <summary>Above this Hessian condition number every plan takes refinement steps: below it, cond·ε ≲ 1e-10 and the condensed solve alone is accurate.</summary>
    internal const double RefinementCondition = 1e6;

    /// <summary>Refinement steps per plan: the first recovers most digits the condensed solve lost, the second the rest.</summary>
    private const int RefinementSteps = 2;

    /// <summary>Fewest active-set iterations a limited plan may take by default, so small problems are never starved.</summary>
    internal const int MinSolverIterations = 50;

    /// <summary>Default iterations per limit row: each row is added at most once on a typical path, dropped at most once.</summary>
    internal const int SolverIterationsPerRow = 2;

    /// <summary>Bytes counted for this object's own fields, the target maps and the trajectory's copies of A, B, C and the weights.</summary>
    private const long FixedOverheadBytes = 4096;

    /// <summary>C x_s within this of r (relative to max(1, ‖r‖∞)) counts as reaching the setpoint: the target maps' rounding, not a real miss.</summary>
    private const double ReferenceReachedTolerance = 1e-9;

    internal CompiledModel(
        ValidatedModel model,
        Matrix<double> a,
        Matrix<double> b,
        Matrix<double> terminal,
        GainSet withoutPrevious,
        GainSet withPrevious,
        ConstrainedProblem? constrainedWithoutPrevious,
        ConstrainedProblem? constrainedWithPrevious,
        InteriorPointProblem? interiorPoint,
        TargetMap targets,
        TargetSolver? targetSolver,
        ModelDiagnostics diagnostics,
        RecedingHorizonGain gain,
        CompileOptions options)
    {
        this.model = model;
        this.withoutPrevious = withoutPrevious;
        this.interiorPoint = interiorPoint;
        this.withPrevious = withPrevious;
        this.targets = targets;
        this.constrainedWithoutPrevious = constrainedWithoutPrevious;
        this.constrainedWithPrevious = constrainedWithPrevious;
        this.targetSolver = targetSolver;
        Options = options;
        DiscreteA = DenseMatrix.Rows(a);
        DiscreteB = DenseMatrix.Rows(b);
        TerminalWeight = DenseMatrix.Rows(terminal);
        Diagnostics = diagnostics;
        Gain = gain;
        refine = diagnostics.HessianCondition > RefinementCondition;
        trajectory = new TrajectoryEvaluator(a, b, model.C, model.OutputIsState, model.OutputWeight, model.InputWeight, model.InputRateWeight, terminal);
    }

    public ModelDocument Document => model.Document;

    public int StateCount => model.StateCount;

    public int InputCount => model.InputCount;

    public int OutputCount => model.OutputCount;

    public int Horizon => model.Horizon;

    public int DecisionVariables => model.Horizon * model.InputCount;

    public double SampleTime => model.SampleTime;

    /// <summary>
    /// The engineering values the model was linearised at (zeros without one). <see cref="Plan(PlanRequest, PlanWarmStart?)"/>
    /// and <see cref="FirstMove"/> take and give engineering units; everything else here is in deviations.
    /// </summary>
    public OperatingPoint OperatingPoint => model.OperatingPoint;

    /// <summary>A after zero-order hold (or as given for a discrete plant), as rows.</summary>
    public double[][] DiscreteA { get; }

    /// <summary>B after zero-order hold (or as given for a discrete plant), as rows.</summary>
    public double[][] DiscreteB { get; }

    /// <summary>E after zero-order hold together with B (or as given), as rows of q; q = 0 without measured disturbances.</summary>
    public double[][] DiscreteE => discreteE;

    /// <summary>The discrete E (n×q) the compiler hands over; also builds the preview maps, which need it.</summary>
    internal Matrix<double> DisturbanceInput
    {
        init
        {
            discreteE = Enumerable.Range(0, value.RowCount).Select(i => Enumerable.Range(0, value.ColumnCount).Select(j => value[i, j]).ToArray()).ToArray();
            eColumnMajor = value.ToColumnMajorArray();
            if (Options.CachePreviewMaps && PreviewMaps.Fits(Horizon, InputCount, OutputCount, value.ColumnCount))
            {
                (previewWithout, previewWith) = PreviewMaps.Build(trajectory, withoutPrevious, withPrevious, eColumnMajor, StateCount, InputCount, OutputCount, value.ColumnCount, Horizon);
            }
        }
    }

    /// <summary>Stacked-preview maps of each variant, or null when they would be too large (see <see cref="PreviewMaps.Fits"/>).</summary>
    internal PreviewMaps? PreviewFor(bool withPreviousInput) => withPreviousInput ? previewWith : previewWithout;

    /// <summary>The offset-free estimator designed at registration, or null when the model has none.</summary>
    public Estimation.Estimator? Estimator { get; init; }

    /// <summary>q, the measured disturbances the model takes.</summary>
    public int DisturbanceCount => model.DisturbanceCount;

    /// <summary>The terminal weight P actually used.</summary>
    public double[][] TerminalWeight { get; }

    public ModelDiagnostics Diagnostics { get; }

    public RecedingHorizonGain Gain { get; }

    internal CompileOptions Options { get; }

    internal ValidatedModel Model => model;

    internal TrajectoryEvaluator Trajectory => trajectory;

    internal ConstrainedProblem? ConstrainedWithoutPrevious => constrainedWithoutPrevious;

    internal ConstrainedProblem? ConstrainedWithPrevious => constrainedWithPrevious;

    /// <summary>Approximate memory held by this object, for cache accounting.</summary>
    public long EstimatedBytes =>
        withoutPrevious.Bytes + (ReferenceEquals(withPrevious, withoutPrevious) ? 0 : withPrevious.Bytes)
        + (constrainedWithoutPrevious?.Bytes ?? 0) + (ReferenceEquals(constrainedWithPrevious, constrainedWithoutPrevious) ? 0 : constrainedWithPrevious?.Bytes ?? 0)
        + (previewWithout?.Bytes ?? 0) + (ReferenceEquals(previewWith, previewWithout) ? 0 : previewWith?.Bytes ?? 0)
        + FixedOverheadBytes;

    /// <summary>True when cold limited plans go to the interior-point solver first (see <see cref="ModelCompiler"/>).</summary>
    internal bool UsesInteriorPoint => interiorPoint is not null;

    /// <summary>True when the model carries any input, rate or output limit.</summary>
    public bool HasLimits => constrainedWithoutPrevious is not null;

    /// <summary>Inequality rows of the limited problem (0 without limits).</summary>
    public int LimitRowCount => constrainedWithoutPrevious?.RowCount ?? 0;

    /// <summary>Iteration cap of the active-set solver per plan: the option, or max(50, 2 × limit rows).</summary>
    public int MaxSolverIterations => Options.MaxSolverIterations ?? Math.Max(MinSolverIterations, SolverIterationsPerRow * LimitRowCount);

    /// <summary>Checks a request's vectors against this model; an empty list means it is acceptable.</summary>
    public IReadOnlyList<ValidationError> ValidateRequest(PlanRequest request)
    {
        var errors = new List<ValidationError>();
        if (request is null)
        {
            errors.Add(new("", "the request is missing"));
            return errors;
        }

        CheckVector(request.State, "state", StateCount, required: true, errors);
        CheckVector(request.Reference, "reference", OutputCount, required: false, errors);
        CheckVector(request.PreviousInput, "previousInput", InputCount, required: false, errors);
        CheckRows(request.ReferenceSchedule, "reference", OutputCount, Horizon, errors);
        if (request.Reference is not null && request.ReferenceSchedule is not null)
        {
            errors.Add(new("reference", "give one setpoint or a schedule, not both"));
        }

        if (request.DisturbanceEstimate is not null)
        {
            if (Estimator is null)
            {
                errors.Add(new("estimate.disturbance", "the model has no estimator; send a measured state instead"));
            }
            else
            {
                CheckVector(request.DisturbanceEstimate, "estimate.disturbance", Estimator.DisturbanceCount, required: true, errors);
            }
        }

        if (request.Disturbance is not null && DisturbanceCount == 0)
        {
            errors.Add(new("disturbance", "the model has no measured disturbances (plant.e)"));
        }
        else
        {
            CheckRows(request.Disturbance, "disturbance", DisturbanceCount, Horizon, errors);
        }
        return errors;
    }

    /// <summary>A carrier for plans of consecutive states of this model (see <see cref="PlanWarmStart"/>).</summary>
    public PlanWarmStart CreateWarmStart() => new(this);

    /// <summary>
    /// The optimal plan for one measured state, in engineering units when the model has an operating point (the
    /// request's state, reference and previous input, and the plan's trajectories and target); J is the same in both.
    /// </summary>
    /// <param name="warmStart">When given, a limited plan starts from the active set of the previous plan made with it.</param>
    /// <exception cref="ModelValidationException">A vector has the wrong length or a non-finite entry.</exception>
    public Plan Plan(PlanRequest request, PlanWarmStart? warmStart = null)
    {
        var plan = PlanInDeviations(OperatingPoint.ToDeviations(request), warmStart);
        OperatingPoint.ToEngineering(plan);
        return plan;
    }

    /// <summary>The plan with every vector in deviations from the operating point (the closed-loop simulator's units).</summary>
    internal Plan PlanInDeviations(PlanRequest request, PlanWarmStart? warmStart = null)
    {
        if (request.HasPreview)
        {
            return PlanWithPreview(request, warmStart);
        }

        if (warmStart is not null && !ReferenceEquals(warmStart.Model, this))
        {
            throw new ArgumentException("the warm start belongs to another model", nameof(warmStart));
        }

        if (!IsWellFormed(request))
        {
            throw new ModelValidationException(ValidateRequest(request));
        }

        int n = StateCount;
        int m = InputCount;
        int p = OutputCount;
        var plan = new Plan(Horizon, n, m, p);
        var gains = request.PreviousInput is null ? withoutPrevious : withPrevious;
        Span<double> targetState = StackScratch.Fits(n) ? stackalloc double[n] : new double[n];
        Span<double> targetInput = StackScratch.Fits(m) ? stackalloc double[m] : new double[m];
        targetState.Clear();
        targetInput.Clear();
        List<Warning>? warnings = null;
        if (request.Reference is { } reference)
        {
            bool limited = Targets(reference, targetState, targetInput);
            plan.Target = MakeTarget(reference, targetState, targetInput, limited);
            if (!plan.Target.ReferenceReached)
            {
                (warnings ??= []).Add(new Warning(limited ? WarningCode.SetpointOutsideInputLimits : WarningCode.SetpointUnreachable) { Amount = plan.Target.OutputError });
            }
        }

        gains.Apply(request.State, request.Reference, targetState, targetInput, request.PreviousInput, plan.Inputs);
        var constrained = request.PreviousInput is null ? constrainedWithoutPrevious : constrainedWithPrevious;
        if (constrained is not null)
        {
            var outcome = SolveLimited(constrained, plan, request, targetState, targetInput, warmStart);
            plan.Status = outcome.Status;
            plan.Iterations = outcome.Iterations;
            plan.ActiveLimits = outcome.ActiveLimits;
            if (outcome.Warnings.Count > 0)
            {
                (warnings ??= []).AddRange(outcome.Warnings);
            }
            plan.Cost = trajectory.Evaluate(plan, request.State, request.Reference, targetState, targetInput, request.PreviousInput);
            var (violation, violationWarning) = constrained.SoftLimits.Violation(plan.Outputs, p);
            plan.MaxOutputViolation = violation;
            if (violationWarning is not null)
            {
                // Only a reported violation carries a penalty: a limit met to rounding (slack 1e-20) leaves a
                // penalty of rounding size, which is not a price anyone paid.
                (warnings ??= []).Add(violationWarning);
                plan.SoftLimitPenalty = outcome.Penalty;
            }
        }
        else
        {
            plan.Cost = trajectory.Evaluate(plan, request.State, request.Reference, targetState, targetInput, request.PreviousInput);
            if (refine)
            {
                Refine(plan, gains, request, targetState, targetInput);
            }
        }

        if (warnings is not null)
        {
            plan.Warnings = warnings;
        }

        if (!double.IsFinite(plan.Cost) || !double.IsFinite(plan.SoftLimitPenalty) || !DenseKernels.AllFinite(plan.Inputs) || !DenseKernels.AllFinite(plan.States) || !DenseKernels.AllFinite(plan.Outputs))
        {
            throw Overflow(request, gains);
        }

        return plan;
    }

    /// <summary>
    /// The first move u_0 and the optimal cost only — what replay of historian data needs. For a model without
    /// limits this skips the trajectory: u_0 comes from the first m rows of the gain maps and J* = zᵀMz from
    /// <see cref="CostForm"/>, a few hundred operations. Limited and ill-conditioned models take the full plan.
    /// </summary>
    /// <param name="firstMove">Receives u_0 (m entries).</param>
    /// <exception cref="ModelValidationException">A vector has the wrong length or a non-finite entry.</exception>
    /// <param name="warmStart">As for <see cref="Plan(PlanRequest, PlanWarmStart?)"/>.</param>
    public FirstMoveResult FirstMove(PlanRequest request, Span<double> firstMove, PlanWarmStart? warmStart = null)
    {
        var result = FirstMoveInDeviations(OperatingPoint.ToDeviations(request), firstMove, warmStart);
        if (firstMove.Length == InputCount)
        {
            OperatingPoint.AddRows(firstMove, OperatingPoint.Input);
        }

        return result;
    }

    private FirstMoveResult FirstMoveInDeviations(PlanRequest request, Span<double> firstMove, PlanWarmStart? warmStart)
    {
        if (firstMove.Length != InputCount)
        {
            throw new ArgumentException($"firstMove has {firstMove.Length} entries; expected {InputCount}", nameof(firstMove));
        }

        if (HasLimits || refine || request.HasPreview || !IsWellFormed(request))
        {
            var plan = PlanInDeviations(request, warmStart);
            plan.Input(0).CopyTo(firstMove);
            return new FirstMoveResult(plan.Status, plan.Cost, plan.Warnings);
        }

        int n = StateCount;
        int m = InputCount;
        var gains = request.PreviousInput is null ? withoutPrevious : withPrevious;
        Span<double> targetState = StackScratch.Fits(n) ? stackalloc double[n] : new double[n];
        Span<double> targetInput = StackScratch.Fits(m) ? stackalloc double[m] : new double[m];
        targetState.Clear();
        targetInput.Clear();
        IReadOnlyList<Warning> warnings = [];
        if (request.Reference is { } reference)
        {
            Targets(reference, targetState, targetInput);
            var target = MakeTarget(reference, targetState, targetInput, limited: false);
            if (!target.ReferenceReached)
            {
                warnings = [new Warning(WarningCode.SetpointUnreachable) { Amount = target.OutputError }];
            }
        }

        gains.Apply(request.State, request.Reference, targetState, targetInput, request.PreviousInput, firstMove);
        double cost = gains.CostForm.Evaluate(request.State, request.Reference, targetState, targetInput, request.PreviousInput);
        if (!double.IsFinite(cost) || !DenseKernels.AllFinite(firstMove))
        {
            throw Overflow(request, gains);
        }

        return new FirstMoveResult(PlanStatus.Optimal, Math.Max(cost, 0), warnings);
    }

    /// <summary>
    /// x_s and u_s for <paramref name="reference"/> from the target maps; under input limits, replaced by the limited
    /// target when the unconstrained one breaks a limit. Returns true when it was.
    /// </summary>
    private bool Targets(double[] reference, Span<double> targetState, Span<double> targetInput)
    {
        DenseKernels.Multiply(targets.StateMap, reference, targetState);
        DenseKernels.Multiply(targets.InputMap, reference, targetInput);
        return targetSolver is not null && targetSolver.Limit(reference, targetState, targetInput);
    }

    /// <summary>
    /// One limited solve. A cold plan of a model compiled with an interior-point solver takes it first (its cost does
    /// not grow with the number of active limits); a warm-started plan, a plan whose first move cannot reach its window,
    /// and any interior-point result that is not a clean optimum go to the dual active-set method. Both reach the
    /// same optimum (the tests hold them to each other and to the CVXOPT fixtures). A cold turn of a warm start on the
    /// active set starts it cold in the warm start's own workspace, which then holds the set it found.
    /// <para>
    /// A warm start pays only while consecutive states are alike. When a warm-started plan needs more than
    /// <see cref="PlanWarmStart.CheapIterations"/> active-set changes, the sequence is taken to have jumped and its next
    /// plans are planned cold, 1, 2, 4 … up to <see cref="PlanWarmStart.MaxColdRun"/> of them after each such plan in a
    /// row; one cheap warm plan resets the count. Independent rows then cost a cold plan each instead of a long warm one.
    /// </para>
    /// </summary>
    private ConstrainedOutcome SolveLimited(ConstrainedProblem constrained, Plan plan, PlanRequest request, ReadOnlySpan<double> targetState, ReadOnlySpan<double> targetInput, PlanWarmStart? warmStart)
    {
        // Cold turns pay where a cold plan is cheap: on the interior point, or on the range-space active set (whose warm
        // start from an unrelated set costs its drops; the cold plan still leaves its set in the workspace).
        bool coldTurns = interiorPoint is not null || constrained.Solver.UsesRangeSpace;
        bool cold = warmStart is null || (coldTurns && warmStart.TakeColdTurn());
        if (cold && interiorPoint is not null && (request.PreviousInput is null || constrained.Rows.UnreachableFirstMoves(request.PreviousInput).Count == 0))
        {
            var unconstrained = System.Buffers.ArrayPool<double>.Shared.Rent(plan.Inputs.Length);
            try
            {
                plan.Inputs.CopyTo(unconstrained, 0);
                var outcome = InteriorPointPlanner.Solve(interiorPoint, plan.Inputs, request.State, request.PreviousInput, request.Reference, targetState, targetInput, Options.SoftLimitLinearWeight);
                if (outcome.Status == PlanStatus.Optimal)
                {
                    return outcome;
                }

                unconstrained.AsSpan(0, plan.Inputs.Length).CopyTo(plan.Inputs);
            }
            finally
            {
                System.Buffers.ArrayPool<double>.Shared.Return(unconstrained);
            }
        }

        var result = constrained.Solve(plan.Inputs, request.State, request.PreviousInput, Options.SoftLimitLinearWeight, MaxSolverIterations, WarmWorkspace(warmStart, constrained), coldStart: cold);
        if (warmStart is not null && coldTurns && !cold)
        {
            warmStart.Record(result.Iterations);
        }

        return result;
    }

    /// <summary>The warm start's own workspace for this variant, made on first use; null without a warm start.</summary>
    private static QpWorkspace? WarmWorkspace(PlanWarmStart? warmStart, ConstrainedProblem variant)
    {
        if (warmStart is null)
        {
            return null;
        }

        bool withPrevious = ReferenceEquals(variant, warmStart.Model.constrainedWithPrevious) && !ReferenceEquals(variant, warmStart.Model.constrainedWithoutPrevious);
        return withPrevious
            ? warmStart.WithPrevious ??= variant.Solver.CreateWorkspace()
            : warmStart.WithoutPrevious ??= variant.Solver.CreateWorkspace();
    }

    /// <summary>Finite but enormous request values can still overflow the prediction; refuse them as a bad request naming the field.</summary>
    private ModelValidationException Overflow(PlanRequest request, GainSet gains) =>
        PredictionOverflow.Refusal(PredictionOverflow.Blame(request, gains, targets, trajectory, Horizon, StateCount, InputCount, OutputCount));

    /// <summary>The same test as <see cref="ValidateRequest"/> without building an error list.</summary>
    private bool IsWellFormed(PlanRequest request)
    {
        static bool Ok(double[]? v, int size, bool required) =>
            v is null ? !required : v.Length == size && Array.TrueForAll(v, double.IsFinite);
        static bool Rows(double[][]? rows, int width, int horizon) =>
            rows is null || (rows.Length >= 1 && rows.Length <= horizon && Array.TrueForAll(rows, row => Ok(row, width, true)));
        return request is not null && Ok(request.State, StateCount, true) && Ok(request.Reference, OutputCount, false) && Ok(request.PreviousInput, InputCount, false)
            && Rows(request.ReferenceSchedule, OutputCount, Horizon) && (request.Disturbance is null || (DisturbanceCount > 0 && Rows(request.Disturbance, DisturbanceCount, Horizon)))
            && !(request.Reference is not null && request.ReferenceSchedule is not null)
            && (request.DisturbanceEstimate is null || (Estimator is not null && Ok(request.DisturbanceEstimate, Estimator.DisturbanceCount, true)));
    }

    /// <summary>A schedule or forecast: 1…N rows of <paramref name="width"/> finite numbers; the count is checked before the rows.</summary>
    private static void CheckRows(double[][]? rows, string path, int width, int horizon, List<ValidationError> errors)
    {
        if (rows is null)
        {
            return;
        }

        if (rows.Length < 1 || rows.Length > horizon)
        {
            errors.Add(new(path, $"has {rows.Length} rows; give 1 to {horizon} (the horizon), the last one is held to the end"));
            return;
        }

        for (int k = 0; k < rows.Length && errors.Count < 20; k++)
        {
            CheckVector(rows[k], $"{path}[{k}]", width, required: true, errors);
        }
    }

    /// <summary>
    /// One step of iterative refinement, U ← U − H⁻¹g with g the adjoint gradient on the true trajectory.
    /// Only for ill-conditioned models (strongly unstable plants over long horizons), where the condensed
    /// solve alone loses digits in proportion to the condition number.
    /// </summary>
    private void Refine(Plan plan, GainSet gains, PlanRequest request, ReadOnlySpan<double> targetState, ReadOnlySpan<double> targetInput)
    {
        var rented = System.Buffers.ArrayPool<double>.Shared.Rent(DecisionVariables);
        try
        {
            var gradient = rented.AsSpan(0, DecisionVariables);
            for (int pass = 0; pass < RefinementSteps; pass++)
            {
                trajectory.Gradient(plan.Inputs, plan.States, plan.Outputs, Horizon, request.Reference, targetState, targetInput, request.PreviousInput, gradient);
                gains.Factor.Solve(gradient);
                var u = plan.Inputs.AsSpan();
                for (int i = 0; i < u.Length; i++)
                {
                    u[i] -= gradient[i];
                }

                plan.Cost = trajectory.Evaluate(plan, request.State, request.Reference, targetState, targetInput, request.PreviousInput);
            }
        }
        finally
        {
            System.Buffers.ArrayPool<double>.Shared.Return(rented);
        }
    }

    private SteadyStateTarget MakeTarget(double[] reference, ReadOnlySpan<double> state, ReadOnlySpan<double> input, bool limited)
    {
        var output = new double[OutputCount];
        trajectory.Output(state, output);
        double worst = 0;
        double scale = 1;
        for (int j = 0; j < reference.Length; j++)
        {
            worst = Math.Max(worst, Math.Abs(output[j] - reference[j]));
            scale = Math.Max(scale, Math.Abs(reference[j]));
        }

        return new SteadyStateTarget(state.ToArray(), input.ToArray(), output, worst <= ReferenceReachedTolerance * scale, limited) { OutputError = worst };
    }

    private static void CheckVector(double[]? vector, string path, int size, bool required, List<ValidationError> errors)
    {
        if (vector is null)
        {
            if (required)
            {
                errors.Add(new(path, "is required"));
            }

            return;
        }

        if (vector.Length != size)
        {
            errors.Add(new(path, $"has {vector.Length} entries; expected {size}"));
            return;
        }

        for (int i = 0; i < vector.Length; i++)
        {
            if (!double.IsFinite(vector[i]))
            {
                errors.Add(new($"{path}[{i}]", "must be a finite number"));
            }
        }
    }
}
