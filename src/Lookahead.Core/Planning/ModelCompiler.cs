using Lookahead.Core.Models;
using Lookahead.Core.Numerics;
using Lookahead.Core.Validation;
using MathNet.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>Validates, discretises, condenses and factorises a model once, producing an immutable <see cref="CompiledModel"/>.</summary>
public static class ModelCompiler
{
    /// <summary>Why the condensed Hessian cannot be factored: told at cost.inputWeight, the weight that keeps it definite.</summary>
    private const string HessianTooSingular =
        "is too small next to the rest of the cost: the condensed Hessian is not numerically positive definite " +
        "(some input directions move the outputs too little to be told apart), so the plan is not unique in double precision — raise the input weight";

    /// <summary>
    /// Largest n + m whose cold limited plans go to the interior-point solver when rate or soft output limits are
    /// present: there its iteration count (about 12) beats the active set's one iteration per active limit (measured on
    /// the demo, n + m = 6: 2.6× faster median, 5× faster 99th percentile). Larger states, or input bounds alone (M1,
    /// n + m = 15), favour the active set, whose iterations cost less there.
    /// </summary>
    internal const int InteriorPointUpTo = 12;

    /// <summary>
    /// Up to this many limit rows, a model whose active set runs in range-space form (<see cref="Optimization.RangeSpaceActiveSet"/>)
    /// plans cold on it instead of the interior point: its steps cost O(q²) in the active rows, so it wins while the
    /// program is small. Measured on the demo over horizons (<c>--cold-solvers</c>, 200 seeded states, median / p99 µs,
    /// range space against interior point, 3 December 2026, fifth session): N = 20 (363 rows) 21 / 41 against
    /// 103 / 133; N = 30 (543) 41 / 81 against 159 / 213; N = 40 (723) 78 / 176 against 221 / 310; N = 50 (903)
    /// 100 / 329 against 261 / 394; as served (inputs in %) alike. It wins on both at every horizon measured, and S
    /// alone must fit 2²⁰ doubles (<see cref="Optimization.RangeSpaceActiveSet.Fits"/>), so 1,024 rows is every program
    /// the form takes.
    /// </summary>
    internal const int RangeSpaceRowsUpTo = 1024;

    /// <summary>Compiles <paramref name="document"/>.</summary>
    /// <exception cref="ModelValidationException">The document is invalid, or the requested terminal weight does not exist.</exception>
    public static CompiledModel Compile(ModelDocument document, CompileOptions? options = null) =>
        Compile(document, options, DenseLinearAlgebra.Default);

    /// <summary>
    /// Compiles <paramref name="document"/>, giving up between its phases (discretisation, Riccati, condensing, each
    /// factorisation, the limit tables, the diagnostics, the preview maps) once <paramref name="cancellationToken"/> is
    /// cancelled. A phase already running is finished first: the checks are coarse so they cost nothing measurable.
    /// </summary>
    /// <exception cref="ModelValidationException">The document is invalid, or the requested terminal weight does not exist.</exception>
    /// <exception cref="OperationCanceledException">The token was cancelled before the compile finished.</exception>
    public static CompiledModel Compile(ModelDocument document, CompileOptions? options, CancellationToken cancellationToken) =>
        Compile(document, options, DenseLinearAlgebra.Default, cancellationToken);

    /// <summary>Compiles <paramref name="document"/> with the dense kernels of <paramref name="algebra"/> (tests compare the two).</summary>
    internal static CompiledModel Compile(ModelDocument document, CompileOptions? options, DenseLinearAlgebra algebra, CancellationToken cancellationToken = default)
    {
        options ??= CompileOptions.Default;
        cancellationToken.ThrowIfCancellationRequested();
        var model = ModelValidator.Build(document, options.SizeLimits);
        int n = model.StateCount;
        var a = model.A;
        var b = model.B;
        var e = model.E;
        if (model.TimeDomain == TimeDomain.Continuous)
        {
            (a, b, e) = Discretise(model);
            cancellationToken.ThrowIfCancellationRequested();
        }

        var qx = model.C.TransposeThisAndMultiply(model.OutputWeight * model.C);
        qx = (qx + qx.Transpose()) * 0.5;
        var warnings = new List<Warning>();

        RiccatiSolution? riccati = null;
        Matrix<double> terminal;
        switch (model.TerminalKind)
        {
            case TerminalWeightKind.Riccati:
                try
                {
                    riccati = DiscreteRiccati.Solve(a, b, qx, model.InputWeight);
                }
                catch (Exception ex) when (ex is RiccatiException or NumericScaleException or NonConvergenceException)
                {
                    throw new ModelValidationException("cost.terminalWeight", $"'riccati' is not available for this plant: {ex.Message}. Use 'stage' or an explicit matrix");
                }

                terminal = riccati.P;
                cancellationToken.ThrowIfCancellationRequested();
                break;
            case TerminalWeightKind.Stage:
                terminal = qx;
                break;
            default:
                terminal = model.TerminalMatrix!;
                break;
        }

        var (withoutPrevious, withPrevious, condition) = BuildGains(model, a, b, terminal, algebra, cancellationToken);
        cancellationToken.ThrowIfCancellationRequested();
        var targets = Guarded("plant.a", "the steady-state targets of (A, B, C) could not be computed", () => TargetMap.Build(a, b, model.C, model.OutputWeight, e));
        ConstrainedProblem? constrainedWithout = null;
        ConstrainedProblem? constrainedWith = null;
        InteriorPointProblem? interiorPoint = null;
        TargetSolver? targetSolver = null;
        if (model.Limits.Any)
        {
            long entries = ConstrainedProblem.OutputRowEntries(model);
            if (entries > ConstrainedProblem.MaxOutputRowEntries)
            {
                throw new ModelValidationException("limits", $"soft output limits over this horizon need {entries:N0} coefficients; at most {ConstrainedProblem.MaxOutputRowEntries:N0} are allowed — limit fewer outputs or shorten the horizon");
            }

            constrainedWithout = new ConstrainedProblem(model, a, b, withoutPrevious);
            cancellationToken.ThrowIfCancellationRequested();
            constrainedWith = ReferenceEquals(withPrevious, withoutPrevious) ? constrainedWithout : new ConstrainedProblem(model, a, b, withPrevious);
            cancellationToken.ThrowIfCancellationRequested();
            bool smallRangeSpace = constrainedWith.Solver.UsesRangeSpace && constrainedWith.RowCount <= options.RangeSpaceRowsUpTo;
            if ((model.Limits.HasRateBounds || model.Limits.HasOutputBounds) && model.StateCount + model.InputCount <= InteriorPointUpTo && !smallRangeSpace)
            {
                int cap = Math.Min(options.MaxSolverIterations ?? InteriorPointProblem.DefaultMaxIterations, InteriorPointProblem.DefaultMaxIterations);
                interiorPoint = new InteriorPointProblem(model, a, b, terminal, cap);
            }
            if (model.Limits.HasInputBounds)
            {
                targetSolver = Guarded("cost.outputWeight", "the limited steady-state targets could not be prepared", () => new TargetSolver(a, b, model.C, model.OutputWeight, model.Limits, e));
            }
        }

        cancellationToken.ThrowIfCancellationRequested();

        // Diagnostics: what an engineer should read before closing the loop.
        // Each step names the field its data came from, should its scale defeat it.
        int rank = Guarded("plant.b", "the controllability rank could not be computed", () => SystemProperties.ControllabilityRank(a, b));
        var stabilisable = Guarded("plant.b", "stabilisability could not be tested", () => SystemProperties.Stabilisable(a, b));
        var detectable = Guarded("cost.outputWeight", "detectability through the output weight could not be tested", () => SystemProperties.Detectable(a, qx));
        double openLoopRadius = Guarded("plant.a", "the eigenvalues of A could not be computed", () => SystemProperties.SpectralRadius(a));
        var gainRows = Matrix<double>.Build.Dense(model.InputCount, n);
        for (int j = 0; j < n; j++)
        {
            for (int i = 0; i < model.InputCount; i++)
            {
                gainRows[i, j] = withoutPrevious.Kx[(j * withoutPrevious.Rows) + i];
            }
        }

        var closedLoop = Guarded("cost.horizon", "the closed-loop eigenvalues could not be computed", () => SystemProperties.Eigenvalues(a - (b * gainRows)));
        double closedLoopRadius = closedLoop.Select(z => z.Magnitude).DefaultIfEmpty(0).Max();

        if (closedLoopRadius >= 1)
        {
            warnings.Add(new Warning(WarningCode.ClosedLoopUnstable) { Amount = closedLoopRadius });
        }

        if (!stabilisable.Holds)
        {
            warnings.Add(new Warning(WarningCode.NotStabilisable) { Eigenvalue = stabilisable.Witness });
        }
        else if (rank < n)
        {
            warnings.Add(new Warning(WarningCode.NotControllable) { Count = rank });
        }

        if (!detectable.Holds)
        {
            warnings.Add(new Warning(WarningCode.ModeUnseenByCost) { Eigenvalue = detectable.Witness });
        }

        if (condition > options.IllConditionedThreshold)
        {
            warnings.Add(new Warning(WarningCode.HessianIllConditioned) { Amount = condition });
        }

        var diagnostics = new ModelDiagnostics(rank, rank == n, stabilisable.Holds, detectable.Holds, openLoopRadius, riccati?.RelativeResidual, riccati?.Iterations, condition, closedLoopRadius, warnings);
        var gain = new RecedingHorizonGain(DenseMatrix.Rows(gainRows), closedLoop, closedLoopRadius);
        // The estimator is designed on the discrete plant; measured disturbances enter its prediction as E v.
        var estimator = model.Document.Estimator is { } spec ? Estimation.EstimatorDesign.Build(a, b, model.C, spec) : null;
        // The preview maps are built as the model is assembled below, the last large phase.
        cancellationToken.ThrowIfCancellationRequested();
        return new CompiledModel(model, a, b, terminal, withoutPrevious, withPrevious, constrainedWithout, constrainedWith, interiorPoint, targets, targetSolver, diagnostics, gain, options) { DisturbanceInput = e, Estimator = estimator };
    }

    /// <summary>Discretises a continuous plant, naming the field when the hold is out of range.</summary>
    /// <remarks>B and E are held together — the disturbance is held between samples like the inputs — and split after.</remarks>
    private static (Matrix<double> A, Matrix<double> B, Matrix<double> E) Discretise(ValidatedModel model)
    {
        Matrix<double> ad, held;
        int m = model.InputCount;
        try
        {
            var drives = model.DisturbanceCount == 0 ? model.B : model.B.Append(model.E);
            (ad, held) = ZeroOrderHold.Discretise(model.A, drives, model.SampleTime);
        }
        catch (ArgumentException ex)
        {
            string field = ex.ParamName switch
            {
                "a" => "plant.a",
                "b" => "plant.b",
                _ => "plant.sampleTime",
            };
            throw new ModelValidationException(field, $"cannot be discretised at this sample time: {ReasonOf(ex)}");
        }

        // The held plant must respect the same entry bound as a discrete one: a long hold of a growing plant,
        // or of integrators (B_d ≈ T·B), can push it past what the later products can carry.
        var bd = held.SubMatrix(0, held.RowCount, 0, m);
        var ed = held.SubMatrix(0, held.RowCount, m, model.DisturbanceCount);
        foreach (var (matrix, name) in new[] { (ad, "A_d"), (bd, "B_d"), (ed, "E_d") })
        {
            double largest = matrix.Enumerate().Select(Math.Abs).DefaultIfEmpty(0).Max();
            if (largest > ModelValidator.MaxMagnitude)
            {
                throw new ModelValidationException("plant.sampleTime", $"is {model.SampleTime:g3} s; held over it the plant's {name} has entries up to {largest:g3}, beyond {ModelValidator.MaxMagnitude:g3} — shorten the sample time or check the units of A and B");
            }
        }

        return (ad, bd, ed);
    }

    /// <summary>The exception's message without the "(Parameter 'x')" suffix that names the argument.</summary>
    private static string ReasonOf(ArgumentException ex)
    {
        string suffix = $" (Parameter '{ex.ParamName}')";
        return ex.ParamName is not null && ex.Message.EndsWith(suffix, StringComparison.Ordinal) ? ex.Message[..^suffix.Length] : ex.Message;
    }

    /// <summary>Runs a numeric step; when the data's scale defeats it, the request is refused naming <paramref name="field"/>.</summary>
    private static T Guarded<T>(string field, string step, Func<T> compute)
    {
        try
        {
            return compute();
        }
        catch (Exception ex) when (ex is NumericScaleException or NonConvergenceException)
        {
            throw new ModelValidationException(field, $"{step}: {ex.Message}");
        }
    }

    /// <summary>
    /// Both variants' gains (one object when S = 0) and the condition number of the Hessian without the Δu_0 term.
    /// The program is condensed once; H is factored in place, its strict upper triangle keeping H so that the
    /// variant with the Δu_0 term (H plus S on its first block) is rebuilt from it without a second copy. The factor
    /// is kept only when a plan can read it: under limits (the solver starts from it) or when the condition number
    /// calls for refinement steps.
    /// </summary>
    private static (GainSet WithoutPrevious, GainSet WithPrevious, double Condition) BuildGains(ValidatedModel model, Matrix<double> a, Matrix<double> b, Matrix<double> terminal, DenseLinearAlgebra algebra, CancellationToken cancellationToken)
    {
        var condensed = Condensing.Condense(a, b, model.C, model.OutputWeight, model.InputWeight, model.InputRateWeight, terminal, model.Horizon, algebra);
        cancellationToken.ThrowIfCancellationRequested();
        if (!DenseKernels.AllFinite(condensed.Hessian) || !DenseKernels.AllFinite(condensed.Maps) || !MatrixScale.AllFinite(condensed.FreeCost))
        {
            throw new ModelValidationException("cost.horizon", "the predictions overflow over this horizon: the plant grows too fast for condensing; shorten the horizon or pre-stabilise the plant");
        }

        int rows = condensed.Rows;
        var layout = condensed.Layout;
        var hessian = condensed.Hessian;
        bool hasRateWeight = condensed.HasRateWeight;

        // What the factorisation overwrites and the other steps still need: H itself for the exact eigenvalues
        // (small sizes only), its diagonal for the second variant, and F for the second variant's solves.
        double[]? exact = rows <= HessianCondition.ExactUpTo ? (double[])hessian.Clone() : null;
        var diagonal = new double[rows];
        for (int i = 0; i < rows; i++)
        {
            diagonal[i] = hessian[(i * rows) + i];
        }

        double[]? mapsWithPrevious = null;
        if (hasRateWeight)
        {
            mapsWithPrevious = (double[])condensed.Maps.Clone();
            condensed.PreviousInputMap(mapsWithPrevious);
        }

        // R ≻ 0 is judged relative to R alone; next to the rest of the cost it can still be too small to keep
        // the condensed Hessian definite in double precision (inputs the plant cannot tell apart, say).
        if (!algebra.CholeskyLower(hessian, rows, rows))
        {
            throw new ModelValidationException("cost.inputWeight", HessianTooSingular);
        }

        cancellationToken.ThrowIfCancellationRequested();

        // Without the Δu_0 term Fup is zero, so only the columns before it are solved.
        var mapsWithout = condensed.Maps;
        var formWithout = GainSet.Solve(algebra, hessian, rows, layout, mapsWithout, layout.PreviousInputStart, condensed.FreeCost)
            ?? throw new ModelValidationException("cost.inputWeight", HessianTooSingular);
        double condition = Guarded("cost.inputWeight", "the condition number of the condensed Hessian could not be computed", () => HessianCondition.Compute(algebra, rows, exact, hessian));
        // Every model keeps its factor: a request with a reference schedule or a measured disturbance is answered by one
        // exact Newton step from the gains' answer, which solves with it.
        bool keepFactor = true;
        var withoutPrevious = new GainSet(rows, layout, mapsWithout, formWithout, keepFactor ? KeepFactor(hessian, rows) : null);
        if (mapsWithPrevious is null)
        {
            return (withoutPrevious, withoutPrevious, condition);
        }

        cancellationToken.ThrowIfCancellationRequested();

        // H with the Δu_0 term: the lower triangle back from the upper one, the diagonal, then S on the first block.
        for (int j = 0; j < rows; j++)
        {
            hessian[(j * rows) + j] = diagonal[j];
            for (int i = j + 1; i < rows; i++)
            {
                hessian[(j * rows) + i] = hessian[(i * rows) + j];
            }
        }

        condensed.AddPreviousInputTerm(hessian);
        if (!algebra.CholeskyLower(hessian, rows, rows))
        {
            throw new ModelValidationException("cost.inputWeight", HessianTooSingular);
        }

        var formWith = GainSet.Solve(algebra, hessian, rows, layout, mapsWithPrevious, layout.Size, condensed.FreeCostWithPreviousInput())
            ?? throw new ModelValidationException("cost.inputWeight", HessianTooSingular);
        var withPrevious = new GainSet(rows, layout, mapsWithPrevious, formWith, keepFactor ? KeepFactor(hessian, rows) : null);
        return (withoutPrevious, withPrevious, condition);
    }

    /// <summary>The factor in the lower triangle of <paramref name="lower"/>, copied into the immutable form plans read.</summary>
    private static CholeskyFactor KeepFactor(double[] lower, int rows) => new(ComputedCholesky.WrapLower(lower, rows));
}
