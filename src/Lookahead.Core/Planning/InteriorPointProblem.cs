using System.Collections.Concurrent;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using Lookahead.Core.Validation;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// The limited plan solved by a primal–dual interior-point method whose Newton step is one Riccati recursion over
/// the horizon (<see cref="RiccatiNewtonStep"/>), so an iteration costs O(N(n+m)³) however many limits are active.
/// It solves the same problem as <see cref="ConstrainedProblem"/>: minimise
/// <code>
/// J = Σ_{k=0}^{N−1} [(y_k − r)ᵀQ(y_k − r) + (u_k − u_s)ᵀR(u_k − u_s) + Δu_kᵀSΔu_k] + (x_N − x_s)ᵀP(x_N − x_s) + Σ_j (ρ_j ε_j + w_j ε_j²)
/// </code>
/// subject to x_{k+1} = Ax_k + Bu_k, umin ≤ u_k ≤ umax, dmin ≤ Δu_k ≤ dmax (k = 0 only with u_{−1}),
/// ymin_j − ε_j ≤ y_{k,j} ≤ ymax_j + ε_j (k = 1 … N) and ε ≥ 0 — stated on ½J, like the active-set path.
/// <para>
/// Method: Mehrotra's predictor–corrector (Mehrotra, SIAM J. Optim. 2(4), 1992) on the rows g(z) ≥ 0 of
/// <see cref="StagewiseLimitRows"/> with slacks s and multipliers λ. With d = λ/s, the Newton system reduces to
/// (H + Gᵀdiag(d)G)Δz = −(∇f − Gᵀλ̂), λ̂ = λ − (λg + (corrector term) − σμ)/s — an unconstrained linear–quadratic
/// problem over the horizon; then Δs = GΔz + g − s and Δλ = λ̂ − λ − dGΔz. States are never unknowns: they are
/// rolled out from the inputs, so the dynamics hold exactly at every iterate. The start minimises ½J + ½‖g(z)‖²
/// (one Newton step with d = 1) and shifts s = g and λ = −g into the interior with Mehrotra's balancing rule.
/// </para>
/// <para>
/// Once every row is close to complementarity the solve is finished by polishing (<see cref="TryPolish"/>): the
/// equality-constrained problem on the rows the predictor marks active, solved exactly and kept only if it is a KKT
/// point. Most plans end there, on their limits to rounding, as the active-set path's do.
/// </para>
/// Built once per model and safe for concurrent solves: per-solve buffers come from a pool.
/// </summary>
internal sealed unsafe partial class InteriorPointProblem
{
    /// <summary>
    /// Default iteration cap per solve. The demo and the reference cases need 10–25 iterations (each shrinks the gap
    /// by one to three orders of magnitude); 60 leaves room for badly scaled penalty weights while bounding the time.
    /// </summary>
    public const int DefaultMaxIterations = 60;

    /// <summary>Fraction of the way to the boundary a step may go early on; it tends to 1 as the gap closes.</summary>
    private const double StepToBoundary = 0.995;

    /// <summary>Primal and dual residual tolerance, relative to the rows' and the gradient's scale.</summary>
    private const double ResidualTolerance = 1e-9;

    /// <summary>
    /// Polishing is tried once every row is this close to complementarity (see <see cref="ComplementarityTolerance"/>):
    /// by then the predictor tells the active rows from the others in all but degenerate cases.
    /// </summary>
    private const double PolishThreshold = 1e-2;

    /// <summary>Augmented-Lagrangian weight on the guessed active rows, relative to gradient scale / row scale.</summary>
    private const double PolishWeight = 1e6;

    /// <summary>Multiplier updates per polish; each shrinks the active rows' residual by orders of magnitude.</summary>
    private const int PolishSweepCount = 3;

    /// <summary>Guesses per polish: the first, and up to seven corrections (rows it crossed join, rows pulling the wrong way leave).</summary>
    private const int PolishRounds = 8;

    /// <summary>A polish is abandoned after a sweep that leaves a row outside the guess violated by more than this × row scale.</summary>
    private const double PolishAbandon = 1e-6;

    /// <summary>
    /// At most this many crossed rows widen a guess for another round instead of abandoning it. Chosen by measurement on
    /// the demo (limit, rounds): (3, 3) median 162 µs, p99 210–224 µs; (8, 5) 159 µs, 204–211 µs; (16, 8) 153 µs, 197 µs;
    /// (64, 12) no better; without widening 12.78 iterations per plan and p99 242–306 µs.
    /// </summary>
    private const int MaxWidenedRows = 16;

    private enum PolishOutcome
    {
        /// <summary>Every sweep ran and no row outside the guess was crossed.</summary>
        Solved,

        /// <summary>A few rows outside the guess were crossed and have joined it; solve again.</summary>
        Widened,

        /// <summary>A numerical failure, or more crossed rows than a widening takes.</summary>
        Abandoned,
    }

    /// <summary>
    /// Complementarity: every row must have s_i ≤ tol × row scale (it sits on its limit) or λ_i ≤ tol × gradient
    /// scale (its pull on the inputs is negligible). Stated per row so that rows with very large multipliers (the
    /// slack bounds under a large ρ) are not driven to slacks of 10⁻²⁰, where λ/s would swamp the Newton step.
    /// </summary>
    private const double ComplementarityTolerance = 1e-9;

    /// <summary>
    /// A degenerate row (on its limit with a zero multiplier) approaches complementarity with s and λ both ~√μ; it also
    /// counts as converged once (s/row scale)(λ/gradient scale) ≤ <see cref="ComplementarityTolerance"/> / this, which
    /// bounds what it can still move to ~3·10⁻⁷ of the scales.
    /// </summary>
    private const double DegenerateWeight = 1e4;

    /// <summary>
    /// Rounding allowance on the dual residual per unit of the largest multiplier: when multipliers are huge (a large
    /// ρ) their pulls cancel in the reduced gradient, which then cannot be computed more precisely than this.
    /// </summary>
    private const double RoundingAllowance = 1e-14;

    /// <summary>Iterations without a 10 % drop of μ or of the worst row's complementarity after which a solve is reported as stalled.</summary>
    private const int StallIterations = 5;

    /// <summary>The centring target σμ never goes below this × gradient scale × row scale (see the iteration).</summary>
    private const double CentringFloor = 1e-14;

    /// <summary>Largest fraction of the way to the boundary a step may go, late in the solve.</summary>
    private const double LastStepToBoundary = 1 - 1e-5;

    private readonly int n;
    private readonly int m;
    private readonly int p;
    private readonly int ns;
    private readonly int nv;
    private readonly int horizon;
    private readonly double[] constants;
    private readonly double* a;
    private readonly double* b;
    private readonly double* qx;
    private readonly double* cq;
    private readonly double* r;
    private readonly double* s;
    private readonly double* terminal;
    private readonly double* cs;
    private readonly double[] csArray;
    private readonly bool hasRateWeight;
    private readonly double automaticWithout;
    private readonly double automaticWith;
    private readonly StagewiseLimitRows rows;
    private readonly StagewiseLimitRows unscaledRows;
    private readonly double[] inputScale;
    private readonly RiccatiNewtonStep newton;
    private readonly ModelTiles? tiles;
    private readonly ForcedViolationBound violationBound;
    private readonly ConcurrentBag<InteriorPointWorkspace> pool = new();

    /// <param name="model">The validated model (limits, weights, C).</param>
    /// <param name="a">Discrete A.</param>
    /// <param name="b">Discrete B.</param>
    /// <param name="terminal">The terminal weight P actually used.</param>
    /// <param name="maxIterations">Iteration cap per solve (default <see cref="DefaultMaxIterations"/>).</param>
    /// <param name="allowSmallModelKernels">
    /// Run small models on 4×4 tiles and fully limited models' rows as contiguous blocks (false only to compare with
    /// the general loops in tests).
    /// </param>
    /// <exception cref="ArgumentOutOfRangeException"><paramref name="maxIterations"/> is not positive.</exception>
    public InteriorPointProblem(ValidatedModel model, Matrix<double> a, Matrix<double> b, Matrix<double> terminal, int maxIterations = DefaultMaxIterations, bool allowSmallModelKernels = true)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(maxIterations);
        MaxIterations = maxIterations;
        n = model.StateCount;
        m = model.InputCount;
        p = model.OutputCount;
        horizon = model.Horizon;
        var limits = model.Limits;
        var c = model.C;
        SoftOutputs = Enumerable.Range(0, p).Where(j => double.IsFinite(limits.OutputMin[j]) || double.IsFinite(limits.OutputMax[j])).ToArray();
        ns = SoftOutputs.Length;
        hasRateWeight = model.InputRateWeight.Enumerate().Any(v => v != 0);
        nv = hasRateWeight || limits.HasRateBounds ? m : 0;
        SlackWeights = SoftOutputs.Select(j => limits.OutputViolationWeight[j]).ToArray();
        csArray = new double[ns * n];
        for (int t = 0; t < ns; t++)
        {
            for (int i = 0; i < n; i++)
            {
                csArray[(t * n) + i] = c[SoftOutputs[t], i];
            }
        }

        var qxMatrix = c.TransposeThisAndMultiply(model.OutputWeight * c);
        double[] aRows = DenseMatrix.RowMajor(a);
        double[] bRows = DenseMatrix.RowMajor(b);
        double[] qxRows = DenseMatrix.RowMajor((qxMatrix + qxMatrix.Transpose()) * 0.5);
        double[] cqRows = DenseMatrix.RowMajor(c.TransposeThisAndMultiply(model.OutputWeight));
        double[] rRows = DenseMatrix.RowMajor(model.InputWeight);
        double[] sRows = DenseMatrix.RowMajor(model.InputRateWeight);

        // The iteration runs on inputs measured in about their own range (u = σ·v), so a plant in % or kW takes the
        // same path as one in fractions: B, R and S absorb σ, the input limits are divided by it. σ is a power of
        // two, so scaling and unscaling are exact.
        inputScale = InputScales(limits, m);
        for (int i = 0; i < n; i++)
        {
            for (int j = 0; j < m; j++)
            {
                bRows[(i * m) + j] *= inputScale[j];
            }
        }

        for (int i = 0; i < m; i++)
        {
            for (int j = 0; j < m; j++)
            {
                rRows[(i * m) + j] *= inputScale[i] * inputScale[j];
                sRows[(i * m) + j] *= inputScale[i] * inputScale[j];
            }
        }
        double[] terminalRows = DenseMatrix.RowMajor((terminal + terminal.Transpose()) * 0.5);

        // One pinned block for the model's matrices, so the request-time loops address them directly.
        double[][] parts = [aRows, bRows, qxRows, cqRows, rRows, sRows, terminalRows, csArray];
        constants = GC.AllocateArray<double>(parts.Sum(part => part.Length), pinned: true);
        var at = new double*[parts.Length];
        double* start = Pointer(constants);
        int offset = 0;
        for (int i = 0; i < parts.Length; i++)
        {
            parts[i].CopyTo(constants, offset);
            at[i] = start + offset;
            offset += parts[i].Length;
        }

        this.a = at[0];
        this.b = at[1];
        qx = at[2];
        cq = at[3];
        r = at[4];
        s = at[5];
        this.terminal = at[6];
        cs = at[7];

        double[] softMin = SoftOutputs.Select(j => limits.OutputMin[j]).ToArray();
        double[] softMax = SoftOutputs.Select(j => limits.OutputMax[j]).ToArray();
        double[] Scaled(double[] values) => values.Select((v, i) => v / inputScale[i]).ToArray();
        rows = new StagewiseLimitRows(horizon, n, Scaled(limits.InputMin), Scaled(limits.InputMax), Scaled(limits.InputRateMin), Scaled(limits.InputRateMax), SoftOutputs, softMin, softMax, allowSmallModelKernels);
        unscaledRows = new StagewiseLimitRows(horizon, n, limits.InputMin, limits.InputMax, limits.InputRateMin, limits.InputRateMax, SoftOutputs, softMin, softMax, allowContiguous: false);
        violationBound = new ForcedViolationBound(a, b, csArray, softMin, softMax, horizon, limits.InputMin, limits.InputMax, limits.InputRateMin, limits.InputRateMax);
        newton = new RiccatiNewtonStep(horizon, aRows, bRows, qxRows, rRows, sRows, terminalRows, csArray, SlackWeights, nv > 0, allowSmallModelKernels);
        tiles = newton.Tiles;
        (automaticWithout, automaticWith) = AutomaticWeights(model, a, b, terminal);
    }

    /// <summary>Outputs with a soft limit, in slack order.</summary>
    public int[] SoftOutputs { get; }

    /// <summary>Iteration cap per solve.</summary>
    public int MaxIterations { get; }

    public int SlackCount => ns;

    /// <summary>w_j of each soft output, in slack order.</summary>
    public double[] SlackWeights { get; }

    public int Horizon => horizon;

    public int InputCount => m;

    /// <summary>Whether the per-stage loops run on tiles (see <see cref="RiccatiNewtonStep.IsTiled"/>).</summary>
    public bool IsTiled => tiles is not null;

    /// <summary>
    /// σ_i per input: the power of two nearest to its window umax − umin, or to its rate window when the window is
    /// open, else 1 (kept within 2^±60, so σ² never under- or overflows the weights).
    /// </summary>
    private static double[] InputScales(ValidatedLimits limits, int m)
    {
        var scales = new double[m];
        for (int i = 0; i < m; i++)
        {
            double range = limits.InputMax[i] - limits.InputMin[i];
            if (!(double.IsFinite(range) && range > 0))
            {
                range = limits.InputRateMax[i] - limits.InputRateMin[i];
            }

            scales[i] = double.IsFinite(range) && range > 0 ? Math.ScaleB(1.0, Math.Clamp((int)Math.Round(Math.Log2(range)), -60, 60)) : 1;
        }

        return scales;
    }

    /// <summary>
    /// The active-set path's automatic ρ: 10⁴ × the largest diagonal entry of the condensed Hessian of the variant
    /// (with or without the Δu_0 term), at least 10⁴.
    /// </summary>
    public double AutomaticLinearWeight(bool withPreviousInput) => withPreviousInput && hasRateWeight ? automaticWith : automaticWithout;

    public InteriorPointWorkspace Rent() => pool.TryTake(out var workspace) ? workspace : new InteriorPointWorkspace(n, m, ns, horizon, rows.MaxRows, newton.CreateWorkspace());

    public void Return(InteriorPointWorkspace workspace) => pool.Add(workspace);

    /// <summary>Whether input <paramref name="input"/> cannot reach its window within its first rate step from u_{−1} (the active-set path's test).</summary>
    public bool IsFirstMoveUnreachable(ReadOnlySpan<double> previousInput, int input) => unscaledRows.IsFirstMoveUnreachable(previousInput, input);

    /// <summary>
    /// A lower bound on the largest soft-limit slack any plan respecting the hard limits must have
    /// (<see cref="ForcedViolationBound"/>); <paramref name="firstRateRows"/> as in the solve.
    /// </summary>
    public double ForcedViolation(ReadOnlySpan<double> x0, ReadOnlySpan<double> previousInput, bool firstRateRows) =>
        violationBound.Compute(x0, firstRateRows ? previousInput : default, []);

    /// <summary>The receiving system checks limits exactly, so inputs a rounding error outside their window are put back on it.</summary>
    public void ClipToInputLimits(Span<double> inputs) => unscaledRows.ClipToInputLimits(inputs);

    /// <summary>After a solve in <paramref name="ws"/>, the limits that hold with equality (see <see cref="StagewiseLimitRows.ActiveLimits"/>).</summary>
    public void ActiveLimits(InteriorPointWorkspace ws, bool firstRateRows, List<ActiveLimit> active) => rows.ActiveLimits(ws, rows.Layout(firstRateRows), active);

    /// <summary>Solves one plan with a pooled workspace.</summary>
    /// <param name="x0">Measured state (n).</param>
    /// <param name="previousInput">u_{−1} (m) or empty.</param>
    /// <param name="reference">r (p) or empty for zero.</param>
    /// <param name="targetState">x_s (n) or empty for zero.</param>
    /// <param name="targetInput">u_s (m) or empty for zero.</param>
    /// <param name="linearWeights">ρ_j per soft output (slack order).</param>
    /// <param name="inputs">Receives u_0 … u_{N−1} (N·m).</param>
    /// <param name="slacks">Receives ε (one per soft output).</param>
    /// <exception cref="ArgumentException">A span has the wrong length.</exception>
    public InteriorPointResult Solve(ReadOnlySpan<double> x0, ReadOnlySpan<double> previousInput, ReadOnlySpan<double> reference, ReadOnlySpan<double> targetState, ReadOnlySpan<double> targetInput, ReadOnlySpan<double> linearWeights, Span<double> inputs, Span<double> slacks)
    {
        var workspace = Rent();
        try
        {
            return Solve(workspace, x0, previousInput, reference, targetState, targetInput, linearWeights, inputs, slacks);
        }
        finally
        {
            Return(workspace);
        }
    }

    /// <summary>
    /// As the overload without a workspace, in the caller's workspace, which afterwards holds the rows' slacks and
    /// multipliers (for <see cref="ActiveLimits"/>).
    /// </summary>
    public InteriorPointResult Solve(InteriorPointWorkspace ws, ReadOnlySpan<double> x0, ReadOnlySpan<double> previousInput, ReadOnlySpan<double> reference, ReadOnlySpan<double> targetState, ReadOnlySpan<double> targetInput, ReadOnlySpan<double> linearWeights, Span<double> inputs, Span<double> slacks)
    {
        Check(x0, n, nameof(x0), allowEmpty: false);
        Check(previousInput, m, nameof(previousInput), allowEmpty: true);
        Check(reference, p, nameof(reference), allowEmpty: true);
        Check(targetState, n, nameof(targetState), allowEmpty: true);
        Check(targetInput, m, nameof(targetInput), allowEmpty: true);
        Check(linearWeights, ns, nameof(linearWeights), allowEmpty: ns == 0);
        Check(inputs, horizon * m, nameof(inputs), allowEmpty: false);
        Check(slacks, ns, nameof(slacks), allowEmpty: ns == 0);

        bool hasPrevious = !previousInput.IsEmpty;
        bool dropFirstRate = false;
        double boundScale = rows.Scale;
        var scaledPrevious = ws.ScaledPreviousInput.AsSpan(0, hasPrevious ? m : 0);
        var scaledTarget = ws.ScaledTargetInput.AsSpan(0, targetInput.IsEmpty ? 0 : m);
        for (int i = 0; i < scaledPrevious.Length; i++)
        {
            scaledPrevious[i] = previousInput[i] / inputScale[i];
        }

        for (int i = 0; i < scaledTarget.Length; i++)
        {
            scaledTarget[i] = targetInput[i] / inputScale[i];
        }

        previousInput = scaledPrevious;
        targetInput = scaledTarget;
        for (int i = 0; hasPrevious && i < m; i++)
        {
            dropFirstRate |= rows.IsFirstMoveUnreachable(previousInput, i);
            boundScale = Math.Max(boundScale, 1 + Math.Abs(previousInput[i]));
        }

        var request = new Request(x0, previousInput, reference, targetState, targetInput, linearWeights, rows.Layout(hasPrevious && !dropFirstRate), hasPrevious, boundScale);
        var status = Iterate(ws, request, out int iterations);
        for (int j = 0; j < horizon * m; j++)
        {
            inputs[j] = ws.Inputs[j] * inputScale[j % m];
        }
        for (int t = 0; t < ns; t++)
        {
            slacks[t] = Math.Max(ws.Slacks[t], 0);
        }

        return new InteriorPointResult(status, iterations, dropFirstRate);
    }

    private InteriorPointStatus Iterate(InteriorPointWorkspace ws, in Request request, out int iterations)
    {
        GC.KeepAlive(constants);
        var layout = request.Layout;
        int count = layout.Count;
        var sl = ws.RowSlack.AsSpan(0, count);
        var lam = ws.Multiplier.AsSpan(0, count);
        var value = ws.RowValue.AsSpan(0, count);
        var inverse = ws.InverseSlack.AsSpan(0, count);
        var barrier = ws.Barrier.AsSpan(0, count);
        var shift = ws.Shift.AsSpan(0, count);
        var stepRow = ws.StepRow.AsSpan(0, count);
        var ds = ws.StepRowSlack.AsSpan(0, count);
        var dl = ws.StepMultiplier.AsSpan(0, count);
        var dsAffine = ws.AffineRowSlack.AsSpan(0, count);
        var dlAffine = ws.AffineMultiplier.AsSpan(0, count);
        ReferenceTerm(ws, request);
        ws.GuessChanged = false;
        ws.Guess.AsSpan(0, count).Clear();
        iterations = 0;

        // Start: minimise ½J + ½‖g(z)‖² from z = 0 (one Newton step with unit barrier weights and λ̂ = −g) ...
        Array.Clear(ws.Inputs);
        Array.Clear(ws.Slacks);
        Rollout(ws, request);
        rows.Values(ws, layout, request.PreviousInput);
        ObjectiveGradient(ws, request);
        barrier.Fill(1);
        for (int i = 0; i < count; i++)
        {
            shift[i] = -value[i];
        }

        if (!FactorAndSolve(ws, request, refactor: true))
        {
            return InteriorPointStatus.NumericalFailure;
        }

        Take(ws, 1.0);
        Rollout(ws, request);
        rows.Values(ws, layout, request.PreviousInput);

        // ... then s = g and λ = −g shifted into the interior and balanced (Mehrotra's rule).
        double lowest = double.PositiveInfinity;
        double highest = double.NegativeInfinity;
        foreach (double v in value)
        {
            lowest = Math.Min(lowest, v);
            highest = Math.Max(highest, v);
        }

        double shiftS = Math.Max(-1.5 * lowest, 0);
        double shiftL = Math.Max(1.5 * highest, 0);
        double product = 0;
        double sumS = 0;
        double sumL = 0;
        for (int i = 0; i < count; i++)
        {
            sl[i] = value[i] + shiftS;
            lam[i] = -value[i] + shiftL;
            product += sl[i] * lam[i];
            sumS += sl[i];
            sumL += lam[i];
        }

        double balanceS = sumL > 0 ? 0.5 * product / sumL : 1;
        double balanceL = sumS > 0 ? 0.5 * product / sumS : 1;
        for (int i = 0; i < count; i++)
        {
            sl[i] += balanceS;
            lam[i] += balanceL;
        }

        // The slack bounds ε_j ≥ 0 start with the multiplier they have when no output row pulls: ½ρ_j, the
        // objective's own gradient in ε. From the balanced start (multipliers of order 10²) the second iteration
        // was blocked by them in every plan (its affine step 0.06–0.09), their multipliers being two orders short.
        for (int t = 0; t < ns; t++)
        {
            int row = layout.Slack + t;
            lam[row] = Math.Max(lam[row], 0.5 * request.LinearWeights[t]);
        }

        double mu0 = count > 0 ? ComplementarityKernels.Residuals(sl, lam, value, 1, 1, 0).Gap / count : 0;
        double bestMu = double.PositiveInfinity;
        double bestComplementarity = double.PositiveInfinity;
        int sinceProgress = 0;
        for (iterations = 0; iterations < MaxIterations; iterations++)
        {
            ObjectiveGradient(ws, request);
            double objectiveScale = ObjectiveScale(ws);
            var (primal, complementarity, gap) = ComplementarityKernels.Residuals(sl, lam, value, 1 / request.BoundScale, 1 / objectiveScale, DegenerateWeight);
            double mu = count > 0 ? gap / count : 0;
            if (Converged(ws, request, primal, complementarity, objectiveScale))
            {
                return InteriorPointStatus.Optimal;
            }

            if (mu < 0.9 * bestMu || complementarity < 0.9 * bestComplementarity)
            {
                bestMu = Math.Min(bestMu, mu);
                bestComplementarity = Math.Min(bestComplementarity, complementarity);
                sinceProgress = 0;
            }
            else if (++sinceProgress >= StallIterations)
            {
                return InteriorPointStatus.Stalled;
            }

            bool polishing = complementarity <= PolishThreshold;
            if (polishing && TryPolish(ws, request, objectiveScale))
            {
                iterations++;
                return InteriorPointStatus.Optimal;
            }

            // Predictor (affine scaling, σ = 0).
            ComplementarityKernels.Predictor(sl, lam, value, inverse, barrier, shift);
            if (!FactorAndSolve(ws, request, refactor: true))
            {
                return InteriorPointStatus.NumericalFailure;
            }

            rows.Steps(ws, layout);
            ComplementarityKernels.Steps(stepRow, value, sl, barrier, lam, shift, dsAffine, dlAffine);
            double alphaAffine = ComplementarityKernels.MaxStep(sl, lam, dsAffine, dlAffine, 1.0);
            if (polishing)
            {
                // The predictor's full step anticipates the limit point: rows it drives to s = 0 with λ > 0 are
                // the guess for the next polish.
                var guess = ws.Guess.AsSpan(0, count);
                for (int i = 0; i < count; i++)
                {
                    bool active = lam[i] + dlAffine[i] > sl[i] + dsAffine[i];
                    ws.GuessChanged |= active != guess[i];
                    guess[i] = active;
                }
            }

            double ratio = ComplementarityKernels.GapAfter(sl, lam, dsAffine, dlAffine, alphaAffine) / count / mu;

            // Centring σ = (μ_aff/μ)³, but never aiming below the centring floor: going further only inflates the
            // barrier weights λ/s, which costs the Newton step its accuracy without improving the plan.
            double sigma = Math.Max(ratio * ratio * ratio, Math.Min(1.0, CentringFloor * objectiveScale * request.BoundScale / mu));

            // Corrector with the second-order term Δs_aΔλ_a, on the same factorisation.
            ComplementarityKernels.CorrectorShift(lam, value, inverse, dsAffine, dlAffine, sigma * mu, shift);
            if (!FactorAndSolve(ws, request, refactor: false))
            {
                return InteriorPointStatus.NumericalFailure;
            }

            rows.Steps(ws, layout);
            ComplementarityKernels.Steps(stepRow, value, sl, barrier, lam, shift, ds, dl);
            double eta = Math.Min(LastStepToBoundary, Math.Max(StepToBoundary, 1 - (10 * mu / mu0)));
            double alpha = Math.Min(1.0, eta * ComplementarityKernels.MaxStep(sl, lam, ds, dl, 1 / StepToBoundary));
            if (!(alpha > 0))
            {
                return InteriorPointStatus.NumericalFailure;
            }

            ComplementarityKernels.Move(sl, lam, ds, dl, alpha);
            Take(ws, alpha);
            Rollout(ws, request);
            rows.Values(ws, layout, request.PreviousInput);
        }

        return InteriorPointStatus.IterationLimit;
    }

    /// <summary>Tolerance on the reduced gradient: relative to the gradient scale, plus rounding of the largest pull.</summary>
    private static double DualTolerance(double objectiveScale, ReadOnlySpan<double> multipliers) =>
        (ResidualTolerance * objectiveScale) + (RoundingAllowance * MaxAbs(multipliers));

    /// <summary>The gradient scale: 1 + the largest entry of the objective's own reduced gradient at this point.</summary>
    private double ObjectiveScale(InteriorPointWorkspace ws)
    {
        ReduceGradient(ws, ws.ObjectiveInputGradient, ws.ObjectiveStateGradient);
        return 1 + MaxAbs(ws.ReducedGradient);
    }

    /// <summary>
    /// Converged when, relative to the problem's scale, (1) every row's value matches its slack, (2) every row is
    /// complementary to <see cref="ComplementarityTolerance"/> and (3) the reduced gradient of the Lagrangian (adjoint
    /// recursion through the dynamics) vanishes for u and ε. The objective's own reduced gradient sets the scale.
    /// </summary>
    private bool Converged(InteriorPointWorkspace ws, in Request request, double primal, double complementarity, double objectiveScale)
    {
        if (primal > ResidualTolerance * request.BoundScale || complementarity > ComplementarityTolerance)
        {
            return false;
        }

        Lagrangian(ws, request, ws.Multiplier);
        ReduceGradient(ws, ws.InputGradient, ws.StateGradient);
        if (MaxAbs(ws.ReducedGradient) > DualTolerance(objectiveScale, ws.Multiplier.AsSpan(0, request.Layout.Count)))
        {
            return false;
        }

        for (int t = 0; t < ns; t++)
        {
            if (Math.Abs(ws.SlackGradient[t]) > ResidualTolerance * (1 + Math.Abs(ws.ObjectiveSlackGradient[t])))
            {
                return false;
            }
        }

        return true;
    }

    /// <summary>
    /// Polishing: takes the rows the last predictor drove to λ + Δλ &gt; s + Δs as the active set and solves the
    /// equality-constrained problem on it
    /// by the method of multipliers — minimise ½J − λᵀg_A + (δ/2)‖g_A‖², then λ ← λ − δg_A — on one Riccati
    /// factorisation (barrier weights δ on the guessed rows, 0 elsewhere). The result is kept only if it is a KKT point:
    /// guessed rows on their limits with multipliers ≥ 0, every other row satisfied, the reduced gradient zero.
    /// Otherwise the point is restored and the iteration goes on; a guess is tried only once.
    /// </summary>
    private bool TryPolish(InteriorPointWorkspace ws, in Request request, double objectiveScale)
    {
        int count = request.Layout.Count;
        var sl = ws.RowSlack.AsSpan(0, count);
        var lam = ws.Multiplier.AsSpan(0, count);
        var value = ws.RowValue.AsSpan(0, count);
        var guess = ws.Guess.AsSpan(0, count);
        var multiplier = ws.PolishMultiplier.AsSpan(0, count);
        if (!ws.GuessChanged)
        {
            return false;
        }

        ws.GuessChanged = false;
        double primalTolerance = ResidualTolerance * request.BoundScale;
        ws.Inputs.AsSpan(0, horizon * m).CopyTo(ws.SavedInputs);
        ws.Slacks.AsSpan(0, ns).CopyTo(ws.SavedSlacks);
        for (int round = 0; round < PolishRounds; round++)
        {
            if (round > 0)
            {
                Restore(ws, request);
            }

            // A guess that misses a few rows (they end up crossed) is widened by them and solved again, while the
            // acceptance test still sees rounding of the multipliers as small: with huge multipliers (a raised ρ) a
            // widened guess was measured to pass with a plan 10⁻⁶ off.
            bool widen = round + 1 < PolishRounds && RoundingAllowance * MaxAbs(lam) <= ResidualTolerance * objectiveScale;
            var sweeps = PolishSweeps(ws, request, objectiveScale, widen ? MaxWidenedRows : 0);
            if (sweeps == PolishOutcome.Widened)
            {
                continue;
            }

            if (sweeps == PolishOutcome.Abandoned)
            {
                break;
            }

            double dualTolerance = DualTolerance(objectiveScale, multiplier);
            bool activeOnLimits = true;
            bool feasible = true;
            bool signs = true;
            for (int i = 0; i < count; i++)
            {
                if (guess[i])
                {
                    activeOnLimits &= Math.Abs(value[i]) <= primalTolerance;
                    signs &= multiplier[i] >= -dualTolerance;
                }
                else
                {
                    feasible &= value[i] >= -primalTolerance;
                }
            }

            if (activeOnLimits && feasible && signs && Stationary(ws, request, objectiveScale))
            {
                for (int i = 0; i < count; i++)
                {
                    sl[i] = Math.Max(value[i], 0);
                    lam[i] = Math.Max(multiplier[i], 0);
                }

                return true;
            }

            // A nearly right guess (typically a degenerate row: on its limit with a zero multiplier) is corrected
            // as an active-set method would: rows crossed join, rows pulling the wrong way leave.
            bool changed = false;
            for (int i = 0; activeOnLimits && i < count; i++)
            {
                if (!guess[i] && value[i] < -primalTolerance)
                {
                    guess[i] = true;
                    changed = true;
                }
                else if (guess[i] && multiplier[i] < -dualTolerance)
                {
                    guess[i] = false;
                    changed = true;
                }
            }

            if (!changed)
            {
                break;
            }
        }

        Restore(ws, request);
        return false;
    }

    /// <summary>
    /// The method of multipliers on the guessed rows from the saved point: <see cref="PolishSweepCount"/> exact solves of
    /// min ½J − λᵀg_A + (δ/2)‖g_A‖², each followed by λ ← λ − δg_A. False on a numerical failure, or when a row
    /// outside the guess ends up clearly crossed (the guess is wrong, not nearly right).
    /// </summary>
    private PolishOutcome PolishSweeps(InteriorPointWorkspace ws, in Request request, double objectiveScale, int widenUpTo)
    {
        int count = request.Layout.Count;
        var lam = ws.Multiplier.AsSpan(0, count);
        var value = ws.RowValue.AsSpan(0, count);
        var guess = ws.Guess.AsSpan(0, count);
        var barrier = ws.Barrier.AsSpan(0, count);
        var shift = ws.Shift.AsSpan(0, count);
        var multiplier = ws.PolishMultiplier.AsSpan(0, count);
        double weight = PolishWeight * objectiveScale / request.BoundScale;
        for (int i = 0; i < count; i++)
        {
            barrier[i] = guess[i] ? weight : 0;
            multiplier[i] = guess[i] ? lam[i] : 0;
        }

        for (int sweep = 0; sweep < PolishSweepCount; sweep++)
        {
            for (int i = 0; i < count; i++)
            {
                shift[i] = guess[i] ? multiplier[i] - (weight * value[i]) : 0;
            }

            if (!FactorAndSolve(ws, request, refactor: sweep == 0))
            {
                return PolishOutcome.Abandoned;
            }

            Take(ws, 1.0);
            Rollout(ws, request);
            rows.Values(ws, request.Layout, request.PreviousInput);
            ObjectiveGradient(ws, request);
            int crossed = 0;
            for (int i = 0; i < count; i++)
            {
                if (guess[i])
                {
                    multiplier[i] -= weight * value[i];
                }
                else if (value[i] < -PolishAbandon * request.BoundScale)
                {
                    crossed++;
                }
            }

            if (crossed > 0)
            {
                if (crossed > widenUpTo)
                {
                    return PolishOutcome.Abandoned;
                }

                for (int i = 0; i < count; i++)
                {
                    guess[i] |= value[i] < -PolishAbandon * request.BoundScale;
                }

                return PolishOutcome.Widened;
            }
        }

        return PolishOutcome.Solved;
    }

    /// <summary>Whether the reduced gradient of the Lagrangian with the polish multipliers vanishes (u and ε).</summary>
    private bool Stationary(InteriorPointWorkspace ws, in Request request, double objectiveScale)
    {
        var multiplier = ws.PolishMultiplier.AsSpan(0, request.Layout.Count);
        Lagrangian(ws, request, ws.PolishMultiplier);
        ReduceGradient(ws, ws.InputGradient, ws.StateGradient);
        if (MaxAbs(ws.ReducedGradient) > DualTolerance(objectiveScale, multiplier))
        {
            return false;
        }

        for (int t = 0; t < ns; t++)
        {
            if (Math.Abs(ws.SlackGradient[t]) > ResidualTolerance * (1 + Math.Abs(ws.ObjectiveSlackGradient[t])))
            {
                return false;
            }
        }

        return true;
    }

    /// <summary>Back to the point saved before polishing.</summary>
    private void Restore(InteriorPointWorkspace ws, in Request request)
    {
        ws.SavedInputs.AsSpan(0, horizon * m).CopyTo(ws.Inputs);
        ws.SavedSlacks.AsSpan(0, ns).CopyTo(ws.Slacks);
        Rollout(ws, request);
        rows.Values(ws, request.Layout, request.PreviousInput);
        ObjectiveGradient(ws, request);
    }

    /// <summary>Linear terms ∇f − Gᵀλ̂ (λ̂ = Shift), then the Riccati factorisation for Barrier (if asked) and the step.</summary>
    private bool FactorAndSolve(InteriorPointWorkspace ws, in Request request, bool refactor)
    {
        Lagrangian(ws, request, ws.Shift);
        if (refactor)
        {
            rows.SumBarriers(ws, request.Layout);
            if (!newton.Factor(ws, request.HasPrevious))
            {
                return false;
            }
        }

        newton.Solve(ws);
        SoftOutputValues(Pointer(ws.StepStates), Pointer(ws.StepSoftOutputs));
        return AllFinite(ws.StepInputs) && AllFinite(ws.StepSlacks);
    }

    /// <summary>InputGradient, StateGradient, SlackGradient = stagewise objective gradient − Gᵀ<paramref name="multipliers"/>.</summary>
    private void Lagrangian(InteriorPointWorkspace ws, in Request request, double[] multipliers)
    {
        ws.ObjectiveInputGradient.AsSpan().CopyTo(ws.InputGradient);
        ws.ObjectiveStateGradient.AsSpan().CopyTo(ws.StateGradient);
        ws.ObjectiveSlackGradient.AsSpan().CopyTo(ws.SlackGradient);
        rows.SubtractTransposed(ws, request.Layout, multipliers, csArray);
    }

    /// <summary>u += αΔu, ε += αΔε (states follow by rollout).</summary>
    private void Take(InteriorPointWorkspace ws, double alpha)
    {
        double* u = Pointer(ws.Inputs);
        double* du = Pointer(ws.StepInputs);
        for (int i = 0; i < horizon * m; i++)
        {
            u[i] += alpha * du[i];
        }

        for (int t = 0; t < ns; t++)
        {
            ws.Slacks[t] += alpha * ws.StepSlacks[t];
        }
    }

    /// <summary>x_{k+1} = Ax_k + Bu_k from x_0, and the soft outputs c_sᵀx_k.</summary>
    private void Rollout(InteriorPointWorkspace ws, in Request request)
    {
        if (tiles is not null)
        {
            RolloutTiled(ws, request);
            return;
        }

        double* x = Pointer(ws.States);
        double* u = Pointer(ws.Inputs);
        request.X0.CopyTo(ws.States);
        for (int k = 0; k < horizon; k++)
        {
            double* xk = x + (k * n);
            double* uk = u + (k * m);
            double* next = xk + n;
            for (int i = 0; i < n; i++)
            {
                double sum = 0;
                double* ai = a + (i * n);
                for (int j = 0; j < n; j++)
                {
                    sum += ai[j] * xk[j];
                }

                double* bi = b + (i * m);
                for (int j = 0; j < m; j++)
                {
                    sum += bi[j] * uk[j];
                }

                next[i] = sum;
            }
        }

        SoftOutputValues(x, Pointer(ws.SoftOutputs));
    }

    private void SoftOutputValues(double* x, double* y)
    {
        if (tiles is not null)
        {
            SoftOutputValuesTiled(x, y);
            return;
        }

        for (int k = 1; k <= horizon; k++)
        {
            double* xk = x + (k * n);
            double* yk = y + (k * ns);
            for (int t = 0; t < ns; t++)
            {
                double sum = 0;
                double* ct = cs + (t * n);
                for (int i = 0; i < n; i++)
                {
                    sum += ct[i] * xk[i];
                }

                yk[t] = sum;
            }
        }
    }

    /// <summary>Stagewise gradient of ½J at the current point: per u_k, per x_k (k ≥ 1) and per ε.</summary>
    private void ObjectiveGradient(InteriorPointWorkspace ws, in Request request)
    {
        if (tiles is not null)
        {
            ObjectiveGradientTiled(ws, request);
            return;
        }

        double* u = Pointer(ws.Inputs);
        double* x = Pointer(ws.States);
        double* gu = Pointer(ws.ObjectiveInputGradient);
        double* gx = Pointer(ws.ObjectiveStateGradient);
        double* delta = Pointer(ws.StageVector);
        double* cqr = Pointer(ws.OutputTerm);
        var us = request.TargetInput;
        var xs = request.TargetState;
        var previous = request.PreviousInput;
        for (int k = 0; k < horizon; k++)
        {
            double* uk = u + (k * m);
            double* gk = gu + (k * m);
            for (int j = 0; j < m; j++)
            {
                delta[j] = us.IsEmpty ? uk[j] : uk[j] - us[j];
            }

            MultiplyInto(r, delta, gk, m, 1.0, accumulate: false);
            if (hasRateWeight)
            {
                // S(u_k − u_{k−1}) when that term exists, −S(u_{k+1} − u_k) for the next one.
                if (k > 0 || request.HasPrevious)
                {
                    for (int j = 0; j < m; j++)
                    {
                        delta[j] = uk[j] - (k > 0 ? uk[j - m] : previous[j]);
                    }

                    MultiplyInto(s, delta, gk, m, 1.0, accumulate: true);
                }

                if (k + 1 < horizon)
                {
                    for (int j = 0; j < m; j++)
                    {
                        delta[j] = uk[j + m] - uk[j];
                    }

                    MultiplyInto(s, delta, gk, m, -1.0, accumulate: true);
                }
            }
        }

        // x_k, 1 ≤ k < N: CᵀQC x_k − CᵀQr; x_N: P(x_N − x_s).
        for (int k = 1; k < horizon; k++)
        {
            double* xk = x + (k * n);
            double* gk = gx + (k * n);
            MultiplyInto(qx, xk, gk, n, 1.0, accumulate: false);
            for (int i = 0; i < n; i++)
            {
                gk[i] -= cqr[i];
            }
        }

        double* xN = x + (horizon * n);
        for (int j = 0; j < n; j++)
        {
            delta[j] = xs.IsEmpty ? xN[j] : xN[j] - xs[j];
        }

        MultiplyInto(terminal, delta, gx + (horizon * n), n, 1.0, accumulate: false);
        for (int t = 0; t < ns; t++)
        {
            ws.ObjectiveSlackGradient[t] = (0.5 * request.LinearWeights[t]) + (SlackWeights[t] * ws.Slacks[t]);
        }
    }

    /// <summary>ReducedGradient = ∂/∂u of a stagewise gradient through the dynamics: μ_N = q_N, μ_k = q_k + Aᵀμ_{k+1}, g_k = r_k + Bᵀμ_{k+1}.</summary>
    private void ReduceGradient(InteriorPointWorkspace ws, double[] inputGradient, double[] stateGradient)
    {
        if (tiles is not null)
        {
            ReduceGradientTiled(ws, inputGradient, stateGradient);
            return;
        }

        double* mu = Pointer(ws.CostateX);
        double* next = Pointer(ws.NextCostateX);
        double* reduced = Pointer(ws.ReducedGradient);
        double* gu = Pointer(inputGradient);
        double* gx = Pointer(stateGradient);
        for (int i = 0; i < n; i++)
        {
            mu[i] = gx[(horizon * n) + i];
        }

        for (int k = horizon - 1; k >= 0; k--)
        {
            double* rk = reduced + (k * m);
            double* gk = gu + (k * m);
            for (int i = 0; i < m; i++)
            {
                rk[i] = gk[i];
            }

            for (int l = 0; l < n; l++)
            {
                double ml = mu[l];
                double* bl = b + (l * m);
                for (int i = 0; i < m; i++)
                {
                    rk[i] += bl[i] * ml;
                }
            }

            if (k == 0)
            {
                break;
            }

            double* qk = gx + (k * n);
            for (int i = 0; i < n; i++)
            {
                next[i] = qk[i];
            }

            for (int l = 0; l < n; l++)
            {
                double ml = mu[l];
                double* al = a + (l * n);
                for (int i = 0; i < n; i++)
                {
                    next[i] += al[i] * ml;
                }
            }

            double* swap = mu;
            mu = next;
            next = swap;
        }
    }

    /// <summary>CᵀQr for the request (zero without a reference).</summary>
    private void ReferenceTerm(InteriorPointWorkspace ws, in Request request)
    {
        var cqr = ws.OutputTerm;
        Array.Clear(cqr);
        if (request.Reference.IsEmpty)
        {
            return;
        }

        for (int i = 0; i < n; i++)
        {
            double sum = 0;
            for (int j = 0; j < p; j++)
            {
                sum += cq[(i * p) + j] * request.Reference[j];
            }

            cqr[i] = sum;
        }
    }

    /// <summary>y = scale·W x (or y += …) for a row-major size×size W.</summary>
    private static void MultiplyInto(double* w, double* x, double* y, int size, double scale, bool accumulate)
    {
        for (int i = 0; i < size; i++)
        {
            double sum = 0;
            double* wi = w + (i * size);
            for (int j = 0; j < size; j++)
            {
                sum += wi[j] * x[j];
            }

            y[i] = accumulate ? y[i] + (scale * sum) : scale * sum;
        }
    }

    private static double MaxAbs(ReadOnlySpan<double> v)
    {
        double worst = 0;
        foreach (double x in v)
        {
            worst = Math.Max(worst, Math.Abs(x));
        }

        return worst;
    }

    private static bool AllFinite(ReadOnlySpan<double> v)
    {
        foreach (double x in v)
        {
            if (!double.IsFinite(x))
            {
                return false;
            }
        }

        return true;
    }

    private static void Check(ReadOnlySpan<double> span, int size, string name, bool allowEmpty)
    {
        if (span.Length != size && !(allowEmpty && span.IsEmpty))
        {
            throw new ArgumentException($"{name} has {span.Length} entries; expected {size}{(allowEmpty ? " or none" : "")}", name);
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static double* Pointer(double[] array) => (double*)Unsafe.AsPointer(ref MemoryMarshal.GetArrayDataReference(array));

    /// <summary>
    /// ρ_auto = 10⁴·max(1, max diag H) per variant, with the diagonal blocks of the condensed Hessian
    /// H_kk = BᵀV_kB + R + c_k S (V_{N−1} = P, V_l = CᵀQC + AᵀV_{l+1}A; c_k counts the Δu terms u_k appears in),
    /// computed with the same operations as <see cref="Condensing"/> so both paths pick the same ρ.
    /// </summary>
    private static (double Without, double With) AutomaticWeights(ValidatedModel model, Matrix<double> a, Matrix<double> b, Matrix<double> terminal)
    {
        int horizon = model.Horizon;
        int m = model.InputCount;
        var qxMatrix = model.C.TransposeThisAndMultiply(model.OutputWeight * model.C);
        double without = 0;
        double with = 0;
        var v = terminal;
        for (int l = horizon - 1; l >= 0; l--)
        {
            if (l < horizon - 1)
            {
                v = qxMatrix + a.TransposeThisAndMultiply(v * a);
            }

            var block = b.TransposeThisAndMultiply(v * b);
            for (int i = 0; i < m; i++)
            {
                double h = block[i, i] + (1.0 * model.InputWeight[i, i]);
                int later = l + 1 < horizon ? 1 : 0;
                int countWithout = (l >= 1 ? 1 : 0) + later;
                int countWith = 1 + later;
                without = Math.Max(without, countWithout == 0 ? h : h + (countWithout * model.InputRateWeight[i, i]));
                with = Math.Max(with, h + (countWith * model.InputRateWeight[i, i]));
            }
        }

        return (1e4 * Math.Max(1.0, without), 1e4 * Math.Max(1.0, with));
    }

    /// <summary>One request's vectors (spans into the caller's arrays), its row layout and its row scale.</summary>
    private readonly ref struct Request
    {
        public Request(ReadOnlySpan<double> x0, ReadOnlySpan<double> previousInput, ReadOnlySpan<double> reference, ReadOnlySpan<double> targetState, ReadOnlySpan<double> targetInput, ReadOnlySpan<double> linearWeights, LimitRowLayout layout, bool hasPrevious, double boundScale)
        {
            X0 = x0;
            PreviousInput = previousInput;
            Reference = reference;
            TargetState = targetState;
            TargetInput = targetInput;
            LinearWeights = linearWeights;
            Layout = layout;
            HasPrevious = hasPrevious;
            BoundScale = boundScale;
        }

        public ReadOnlySpan<double> X0 { get; }
        public ReadOnlySpan<double> PreviousInput { get; }
        public ReadOnlySpan<double> Reference { get; }
        public ReadOnlySpan<double> TargetState { get; }
        public ReadOnlySpan<double> TargetInput { get; }
        public ReadOnlySpan<double> LinearWeights { get; }
        public LimitRowLayout Layout { get; }
        public bool HasPrevious { get; }

        /// <summary>1 + the largest finite limit, widened by u_{−1}, which enters the first rate rows.</summary>
        public double BoundScale { get; }
    }
}
