using Lookahead.Core.Models;
using Lookahead.Core.Numerics;
using Lookahead.Core.Validation;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// A model ready to answer plans. For y_k = C x_k, x_0 the measured state and horizon N it minimises
/// <code>
/// J = Σ_{k=0}^{N−1} [ (y_k − r)ᵀQ(y_k − r) + (u_k − u_s)ᵀR(u_k − u_s) + Δu_kᵀSΔu_k ] + (x_N − x_s)ᵀP(x_N − x_s)
/// </code>
/// subject to x_{k+1} = A x_k + B u_k, with Δu_k = u_k − u_{k−1} (the Δu_0 term only when the previous input is given).
/// Immutable and safe to share between threads: every plan works on its own result and stack space.
/// </summary>
public sealed class CompiledModel
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

    /// <summary>Above this Hessian condition number every plan takes refinement steps.</summary>
    internal const double RefinementCondition = 1e6;

    internal CompiledModel(
        ValidatedModel model,
        Matrix<double> a,
        Matrix<double> b,
        Matrix<double> terminal,
        GainSet withoutPrevious,
        GainSet withPrevious,
        ConstrainedProblem? constrainedWithoutPrevious,
        ConstrainedProblem? constrainedWithPrevious,
        TargetMap targets,
        TargetSolver? targetSolver,
        ModelDiagnostics diagnostics,
        RecedingHorizonGain gain,
        CompileOptions options)
    {
        this.model = model;
        this.withoutPrevious = withoutPrevious;
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

    /// <summary>A after zero-order hold (or as given for a discrete plant), as rows.</summary>
    public double[][] DiscreteA { get; }

    /// <summary>B after zero-order hold (or as given for a discrete plant), as rows.</summary>
    public double[][] DiscreteB { get; }

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
        + 4096;

    /// <summary>True when the model carries any input, rate or output limit.</summary>
    public bool HasLimits => constrainedWithoutPrevious is not null;

    /// <summary>Inequality rows of the limited problem (0 without limits).</summary>
    public int LimitRowCount => constrainedWithoutPrevious?.RowCount ?? 0;

    /// <summary>Iteration cap of the active-set solver per plan.</summary>
    public int MaxSolverIterations => Options.MaxSolverIterations ?? Math.Max(50, 2 * LimitRowCount);

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
        return errors;
    }

    /// <summary>The optimal plan for one measured state.</summary>
    /// <exception cref="ModelValidationException">A vector has the wrong length or a non-finite entry.</exception>
    public Plan Plan(PlanRequest request)
    {
        if (!IsWellFormed(request))
        {
            throw new ModelValidationException(ValidateRequest(request));
        }

        int n = StateCount;
        int m = InputCount;
        int p = OutputCount;
        var plan = new Plan(Horizon, n, m, p);
        var gains = request.PreviousInput is null ? withoutPrevious : withPrevious;
        Span<double> u = plan.Inputs;

        DenseKernels.MultiplyAddColumns(gains.Kx, request.State, u);
        Span<double> targetState = n <= 256 ? stackalloc double[n] : new double[n];
        Span<double> targetInput = m <= 256 ? stackalloc double[m] : new double[m];
        targetState.Clear();
        targetInput.Clear();
        List<Warning>? warnings = null;
        if (request.Reference is { } reference)
        {
            DenseKernels.Multiply(targets.StateMap, reference, targetState);
            DenseKernels.Multiply(targets.InputMap, reference, targetInput);
            bool limited = targetSolver is not null && targetSolver.Limit(reference, targetState, targetInput);
            DenseKernels.MultiplyAddColumns(gains.Kr, reference, u);
            DenseKernels.MultiplyAddColumns(gains.Kxs, targetState, u);
            DenseKernels.MultiplyAddColumns(gains.Kus, targetInput, u);
            plan.Target = MakeTarget(reference, targetState, targetInput, limited);
            if (!plan.Target.ReferenceReached)
            {
                (warnings ??= []).Add(new Warning(limited ? WarningCode.SetpointOutsideInputLimits : WarningCode.SetpointUnreachable) { Amount = plan.Target.OutputError });
            }
        }

        if (request.PreviousInput is { } previous)
        {
            DenseKernels.MultiplyAddColumns(gains.Kup, previous, u);
        }

        for (int i = 0; i < u.Length; i++)
        {
            u[i] = -u[i];
        }

        var constrained = request.PreviousInput is null ? constrainedWithoutPrevious : constrainedWithPrevious;
        if (constrained is not null)
        {
            var outcome = constrained.Solve(u, request.State, request.PreviousInput, Options.SoftLimitLinearWeight, MaxSolverIterations);
            plan.Status = outcome.Status;
            plan.Iterations = outcome.Iterations;
            plan.ActiveLimits = outcome.ActiveLimits;
            if (outcome.Warnings.Count > 0)
            {
                (warnings ??= []).AddRange(outcome.Warnings);
            }
            plan.Cost = trajectory.Evaluate(plan, request.State, request.Reference, targetState, targetInput, request.PreviousInput) + outcome.Penalty;
            var violation = constrained.WorstViolation(plan.Outputs, p);
            plan.MaxOutputViolation = violation.Amount;
            if (violation.Amount > 1e-9)
            {
                (warnings ??= []).Add(new Warning(WarningCode.SoftOutputLimitExceeded) { Output = violation.Output, Step = violation.Step, Amount = violation.Amount });
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

        if (!double.IsFinite(plan.Cost) || !DenseKernels.AllFinite(plan.Inputs) || !DenseKernels.AllFinite(plan.States) || !DenseKernels.AllFinite(plan.Outputs))
        {
            throw Overflow();
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
    public FirstMoveResult FirstMove(PlanRequest request, Span<double> firstMove)
    {
        if (firstMove.Length != InputCount)
        {
            throw new ArgumentException($"firstMove has {firstMove.Length} entries; expected {InputCount}", nameof(firstMove));
        }

        if (HasLimits || refine || !IsWellFormed(request))
        {
            var plan = Plan(request);
            plan.Input(0).CopyTo(firstMove);
            return new FirstMoveResult(plan.Status, plan.Cost, plan.Warnings);
        }

        int n = StateCount;
        int m = InputCount;
        int rows = DecisionVariables;
        var gains = request.PreviousInput is null ? withoutPrevious : withPrevious;
        firstMove.Clear();
        AddFirstRows(gains.Kx, request.State, rows, firstMove);
        Span<double> targetState = n <= 256 ? stackalloc double[n] : new double[n];
        Span<double> targetInput = m <= 256 ? stackalloc double[m] : new double[m];
        targetState.Clear();
        targetInput.Clear();
        IReadOnlyList<Warning> warnings = [];
        if (request.Reference is { } reference)
        {
            DenseKernels.Multiply(targets.StateMap, reference, targetState);
            DenseKernels.Multiply(targets.InputMap, reference, targetInput);
            AddFirstRows(gains.Kr, reference, rows, firstMove);
            AddFirstRows(gains.Kxs, targetState, rows, firstMove);
            AddFirstRows(gains.Kus, targetInput, rows, firstMove);
            var target = MakeTarget(reference, targetState, targetInput, limited: false);
            if (!target.ReferenceReached)
            {
                warnings = [new Warning(WarningCode.SetpointUnreachable) { Amount = target.OutputError }];
            }
        }

        if (request.PreviousInput is { } previous)
        {
            AddFirstRows(gains.Kup, previous, rows, firstMove);
        }

        for (int i = 0; i < m; i++)
        {
            firstMove[i] = -firstMove[i];
        }

        double cost = gains.CostForm.Evaluate(request.State, request.PreviousInput, request.Reference, targetState, targetInput);
        if (!double.IsFinite(cost) || !DenseKernels.AllFinite(firstMove))
        {
            throw Overflow();
        }

        return new FirstMoveResult(PlanStatus.Optimal, Math.Max(cost, 0), warnings);
    }

    /// <summary>y += (first y.Length rows of the column-major map with <paramref name="rows"/> rows) · x.</summary>
    private static void AddFirstRows(double[] map, ReadOnlySpan<double> x, int rows, Span<double> y)
    {
        for (int j = 0; j < x.Length; j++)
        {
            if (x[j] != 0)
            {
                DenseKernels.Axpy(x[j], map.AsSpan(j * rows, y.Length), y);
            }
        }
    }

    /// <summary>Finite but enormous request values can still overflow the prediction; refuse them as a bad request.</summary>
    private static ModelValidationException Overflow() => new(
        "state",
        "the values are too large: the predicted trajectory or its cost overflows for this plant and horizon");

    /// <summary>The same test as <see cref="ValidateRequest"/> without building an error list.</summary>
    private bool IsWellFormed(PlanRequest request)
    {
        static bool Ok(double[]? v, int size, bool required) =>
            v is null ? !required : v.Length == size && Array.TrueForAll(v, double.IsFinite);
        return request is not null && Ok(request.State, StateCount, true) && Ok(request.Reference, OutputCount, false) && Ok(request.PreviousInput, InputCount, false);
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
            for (int pass = 0; pass < 2; pass++)
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

        return new SteadyStateTarget(state.ToArray(), input.ToArray(), output, worst <= 1e-9 * scale, limited) { OutputError = worst };
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
