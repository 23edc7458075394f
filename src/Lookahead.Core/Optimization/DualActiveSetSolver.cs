using Lookahead.Core.Numerics;

namespace Lookahead.Core.Optimization;

/// <summary>
/// Dual active-set method for strictly convex quadratic programs (Goldfarb &amp; Idnani, "A numerically
/// stable dual method for solving strictly convex quadratic programs", Math. Programming 27, 1983):
/// <code>minimise ½xᵀGx + aᵀx  subject to  n_jᵀx = b_j (j &lt; equalities),  n_jᵀx ≥ b_j (otherwise)</code>
/// It starts from the unconstrained minimiser −G⁻¹a and adds violated constraints one at a time, keeping
/// every iterate dual feasible, so a point that already satisfies every constraint costs nothing more.
/// G, its factor and the constraint normals are fixed per instance; a and b change per solve.
/// The active set is kept as J = J₀Q and upper-triangular R with J₀ᵀN = Q[R; 0], J₀ = L⁻ᵀ (cached per instance).
/// Adding a constraint applies one Householder reflection to J's trailing columns; dropping one restores R to
/// triangular form by Givens rotations.
/// Immutable: any number of threads may solve at once, each with its own <see cref="QpWorkspace"/>.
/// </summary>
public sealed partial class DualActiveSetSolver
{
    /// <summary>Relative feasibility tolerance: n_jᵀx − b_j ≥ −tol·(1 + |b_j|) counts as satisfied.</summary>
    public const double FeasibilityTolerance = 1e-10;

    /// <summary>
    /// Warm starts in a row before J is rebuilt from J₀: each start reuses the previous updates' rounding, so the
    /// chain is cut before orthogonality can drift (the rebuild costs one cold solve in this many).
    /// </summary>
    public const int MaxWarmChain = 256;

    /// <summary>A rebuilt multiplier above −this counts as nonnegative: rounding of R⁻¹R⁻ᵀs, not a wrong sign.</summary>
    private const double WarmMultiplierTolerance = 1e-14;

    /// <summary>
    /// A normal whose part outside the active normals' span has ‖z‖² ≤ this × max(1, ‖d‖²) is treated as dependent on
    /// them (no primal step). Squared norms, so a norm ratio of 1e-12: thousands of ulps, room for the rounding J's
    /// updates leave, yet far below the part any genuinely new direction keeps.
    /// </summary>
    public const double DependentNormalTolerance = 1e-24;

    private readonly CholeskyFactor factor;
    private readonly double[] initialJ;
    private readonly PrimalDualActiveSet? guesser;
    private readonly RangeSpaceActiveSet? rangeSpace;
    private readonly int[] singletonColumn;
    private readonly double[] singletonValue;

    /// <param name="factor">G = LLᵀ.</param>
    /// <param name="constraints">Normals n_j, one row each; equalities first.</param>
    /// <param name="equalityCount">How many leading rows are equalities.</param>
    /// <param name="guessActiveSets">
    /// Try cold starts first by <see cref="PrimalDualActiveSet"/>, which changes many rows per iteration — for programs
    /// whose rows are all bounds on single variables (input limits only), without equalities and with at most
    /// <see cref="PrimalDualActiveSet.MaxRows"/> rows. The optimum is the same. With general rows (rate and output
    /// limits) its guesses were measured to cycle on the demo and the reference cases, costing more than they saved.
    /// Not with the range-space form, which is faster alone: M1 with input limits 5.0 µs against 9.8 µs with the guesser
    /// first (<c>--time-states</c>, 3 December 2026, fifth session).
    /// </param>
    /// <param name="maxGuesses">The guesser's cap before the dual active-set method takes over.</param>
    /// <param name="rangeSpace">
    /// Keep S = NG⁻¹Nᵀ and W = G⁻¹Nᵀ and iterate in range-space form (<see cref="RangeSpaceActiveSet"/>) when the
    /// program has no equalities and they fit (<see cref="RangeSpaceActiveSet.Fits"/>). Same optimum, a few times
    /// faster on limited plans; without it (or when it does not fit) J = L⁻ᵀQ is updated as described above.
    /// </param>
    public DualActiveSetSolver(CholeskyFactor factor, SparseRows constraints, int equalityCount, bool guessActiveSets = false, int maxGuesses = PrimalDualActiveSet.MaxIterations, bool rangeSpace = false)
    {
        if (constraints.ColumnCount != factor.Size)
        {
            throw new ArgumentException($"constraints have {constraints.ColumnCount} columns; G is {factor.Size}×{factor.Size}");
        }

        if (equalityCount < 0 || equalityCount > constraints.RowCount)
        {
            throw new ArgumentOutOfRangeException(nameof(equalityCount));
        }

        this.factor = factor;
        Constraints = constraints;
        EqualityCount = equalityCount;
        int n = factor.Size;

        // J₀ = L⁻ᵀ: column c of J₀ is row c of L⁻¹.
        initialJ = factor.InverseTransposeColumnMajor();
        singletonColumn = new int[constraints.RowCount];
        singletonValue = new double[constraints.RowCount];
        for (int row = 0; row < constraints.RowCount; row++)
        {
            singletonColumn[row] = constraints.IsSingleton(row) ? constraints.ColumnsOf(row)[0] : -1;
            singletonValue[row] = constraints.IsSingleton(row) ? constraints.ValuesOf(row)[0] : 0;
        }

        if (rangeSpace && equalityCount == 0 && RangeSpaceActiveSet.Fits(n, constraints.RowCount))
        {
            this.rangeSpace = new RangeSpaceActiveSet(factor, constraints);
        }

        if (guessActiveSets && this.rangeSpace is null && equalityCount == 0 && constraints.RowCount <= PrimalDualActiveSet.MaxRows && singletonColumn.All(column => column >= 0))
        {
            guesser = new PrimalDualActiveSet(constraints, initialJ, maxGuesses);
        }
    }

    /// <summary>Whether solves iterate in range-space form.</summary>
    public bool UsesRangeSpace => rangeSpace is not null;

    /// <summary>Memory held by the range-space form's S and W, when there is one.</summary>
    public long RangeSpaceBytes => rangeSpace?.Bytes ?? 0;

    /// <summary>Whether cold starts are first tried by <see cref="PrimalDualActiveSet"/>.</summary>
    public bool GuessesActiveSets => guesser is not null;

    /// <summary>Memory held beyond J₀: the guesser's S and directions, when there is one.</summary>
    public long GuessBytes => guesser?.Bytes ?? 0;

    public int Variables => factor.Size;

    public SparseRows Constraints { get; }

    public int EqualityCount { get; }

    public QpWorkspace CreateWorkspace() => new(Variables, Constraints.RowCount, withJ: rangeSpace is null);

    /// <summary>Solves the program for linear term <paramref name="linear"/> (a) and right-hand sides <paramref name="rhs"/> (b).</summary>
    /// <param name="linear">a; ignored when <paramref name="unconstrained"/> is true.</param>
    /// <param name="rhs">b, one per constraint; −∞ disables an inequality for this solve.</param>
    /// <param name="x">On return the solution; on entry the unconstrained minimiser when <paramref name="unconstrained"/> is true.</param>
    /// <param name="maxIterations">Cap on constraint additions and drops.</param>
    /// <param name="warmStart">
    /// Start from the active set the workspace's last solve of this program ended with instead of from none: its
    /// factorisation is kept, the point and multipliers are rebuilt for the new a and b, constraints whose multipliers
    /// turn negative (or whose row is switched off) are dropped, and the usual iterations go on from there. The
    /// optimum is the same as from a cold start (the program is strictly convex); only the path is shorter when
    /// consecutive solves are alike. Ignored without equalities-free programs or when the workspace holds nothing.
    /// </param>
    public QpResult Solve(ReadOnlySpan<double> linear, ReadOnlySpan<double> rhs, Span<double> x, bool unconstrained, int maxIterations, QpWorkspace workspace, bool warmStart = false)
    {
        var result = SolveFrom(linear, rhs, x, unconstrained, maxIterations, workspace, warmStart, out bool factored);
        workspace.FactoredCount = factored ? result.ActiveCount : -1;
        workspace.LastActiveCount = result.ActiveCount;
        return result;
    }

    private QpResult SolveFrom(ReadOnlySpan<double> linear, ReadOnlySpan<double> rhs, Span<double> x, bool unconstrained, int maxIterations, QpWorkspace workspace, bool warmStart, out bool factored)
    {
        factored = true;
        int n = Variables;
        int m = Constraints.RowCount;
        if (rhs.Length != m || x.Length != n || (!unconstrained && linear.Length != n) || workspace.Variables != n || workspace.Constraints != m)
        {
            throw new ArgumentException("vector or workspace sizes do not match the program");
        }

        var j = workspace.J.AsSpan();
        var r = workspace.R.AsSpan();
        var d = workspace.D.AsSpan();
        var z = workspace.Z.AsSpan();
        var step = workspace.Step.AsSpan();
        var u = workspace.Multipliers.AsSpan();
        var active = workspace.Active.AsSpan();
        var isActive = workspace.IsActive.AsSpan();
        if (!unconstrained)
        {
            linear.CopyTo(x);
            factor.Solve(x);
            for (int i = 0; i < n; i++)
            {
                x[i] = -x[i];
            }
        }

        if (rangeSpace is not null)
        {
            return SolveInRangeSpace(rhs, x, maxIterations, workspace, warmStart, out factored);
        }

        int q = 0;
        int iterations = 0;
        int candidate = -1;
        bool warm = warmStart && EqualityCount == 0 && workspace.FactoredCount >= 0 && workspace.WarmChain < MaxWarmChain;
        isActive.Clear();
        if (warm)
        {
            workspace.WarmChain++;
            q = workspace.FactoredCount;
            for (int i = 0; i < q; i++)
            {
                isActive[active[i]] = true;
            }

            iterations = Resume(rhs, x, ref q, workspace);
        }
        else
        {
            if (guesser is not null)
            {
                // A warm start whose last set was found by the guesser (so never factored) guesses from that set.
                var guess = warmStart && workspace.FactoredCount < 0 ? workspace.Active.AsSpan(0, workspace.LastActiveCount) : default;
                if (guesser.TrySolve(rhs, x, guess, workspace, out int count, out int guesses))
                {
                    factored = false;
                    return new QpResult(QpStatus.Optimal, guesses, count, -1);
                }

                iterations = guesses;
            }

            workspace.WarmChain = 0;
            initialJ.CopyTo(j);
        }

        // Equalities first: each is added with a full step; its multiplier has no sign.
        for (int e = 0; e < EqualityCount; e++)
        {
            double slack = Constraints.Dot(e, x) - rhs[e];
            Directions(e, q, j, r, d, z, step);
            double zz = Norm2Tail(d, q, n);
            if (zz <= DependentNormalTolerance * Math.Max(1, Norm2Tail(d, 0, n)))
            {
                // Dependent on earlier equalities: fine if consistent, infeasible otherwise.
                if (Math.Abs(slack) > FeasibilityTolerance * (1 + Math.Abs(rhs[e])))
                {
                    return new QpResult(QpStatus.Infeasible, iterations, q, e);
                }

                continue;
            }

            double t = -slack / zz;
            for (int i = 0; i < n; i++)
            {
                x[i] += t * z[i];
            }

            for (int i = 0; i < q; i++)
            {
                u[i] -= t * step[i];
            }

            u[q] = t;
            AddConstraint(e, ref q, j, r, d, active, isActive, z);
            iterations++;
        }

        while (true)
        {
            if (candidate < 0)
            {
                candidate = MostViolated(rhs, x, isActive);
                if (candidate < 0)
                {
                    return new QpResult(QpStatus.Optimal, iterations, q, -1);
                }

                u[q] = 0;
            }

            if (iterations >= maxIterations)
            {
                return new QpResult(QpStatus.IterationLimit, iterations, q, -1);
            }

            // Step directions for the candidate: primal z in the null space of the active normals, dual r.
            Directions(candidate, q, j, r, d, z, step);
            double zz = Norm2Tail(d, q, n);
            bool primalStep = zz > DependentNormalTolerance * Math.Max(1, Norm2Tail(d, 0, n));

            // Partial step: the largest t that keeps every inequality multiplier nonnegative.
            double partial = double.PositiveInfinity;
            int blocking = -1;
            for (int i = 0; i < q; i++)
            {
                if (active[i] >= EqualityCount && step[i] > 0)
                {
                    double ratio = u[i] / step[i];
                    if (ratio < partial)
                    {
                        partial = ratio;
                        blocking = i;
                    }
                }
            }

            double slack = Constraints.Dot(candidate, x) - rhs[candidate];
            double full = primalStep ? -slack / zz : double.PositiveInfinity;
            double t = Math.Min(partial, full);
            if (double.IsPositiveInfinity(t))
            {
                return new QpResult(QpStatus.Infeasible, iterations, q, candidate);
            }

            if (double.IsNaN(t))
            {
                // Overflowed data (a state near the largest double): no row can be chosen to leave, so stop here.
                return new QpResult(QpStatus.NotFinite, iterations, q, -1);
            }

            if (primalStep)
            {
                for (int i = 0; i < n; i++)
                {
                    x[i] += t * z[i];
                }
            }

            for (int i = 0; i < q; i++)
            {
                u[i] -= t * step[i];
            }

            u[q] += t;
            iterations++;
            if (primalStep && full <= partial)
            {
                AddConstraint(candidate, ref q, j, r, d, active, isActive, z);
                candidate = -1;
            }
            else
            {
                // Drop the blocking constraint, keep the candidate's multiplier in the last slot.
                double candidateMultiplier = u[q];
                DropConstraint(blocking, ref q, j, r, u, active, isActive);
                u[q] = candidateMultiplier;
            }
        }
    }

    /// <summary>
    /// Warm start: with the kept factorisation of the active set A, the minimiser on A and its multipliers are
    /// x = x₀ + J₁R⁻ᵀs and u = R⁻¹R⁻ᵀs with s = b_A − N_Aᵀx₀ and x₀ the unconstrained minimiser (N_A = L Q₁ R and
    /// J₁ = L⁻ᵀQ₁, so N_Aᵀ J₁ R⁻ᵀ = I and G⁻¹N_A = J₁R⁻ᵀ). A row switched off for this solve, or the one with the most
    /// negative multiplier, is dropped and the point rebuilt, until every multiplier is nonnegative: then x, u and A
    /// are a dual-feasible start for the usual iterations. Returns the drops made (they count as iterations).
    /// </summary>
    private int Resume(ReadOnlySpan<double> rhs, Span<double> x, ref int q, QpWorkspace workspace)
    {
        int n = Variables;
        var j = workspace.J.AsSpan();
        var r = workspace.R.AsSpan();
        var u = workspace.Multipliers.AsSpan();
        var active = workspace.Active.AsSpan();
        var isActive = workspace.IsActive.AsSpan();
        var start = workspace.Start.AsSpan();
        var w = workspace.Step.AsSpan();
        x.CopyTo(start);
        int drops = 0;
        while (true)
        {
            int drop = -1;
            for (int i = 0; i < q && drop < 0; i++)
            {
                if (double.IsNegativeInfinity(rhs[active[i]]))
                {
                    drop = i;
                }
            }

            if (drop < 0)
            {
                // w = R⁻ᵀs (Rᵀ is lower triangular; R(k, i) sits at r[i·n + k]).
                for (int i = 0; i < q; i++)
                {
                    double sum = rhs[active[i]] - Constraints.Dot(active[i], start);
                    for (int k = 0; k < i; k++)
                    {
                        sum -= r[(i * n) + k] * w[k];
                    }

                    w[i] = sum / r[(i * n) + i];
                }

                // u = R⁻¹w, by back substitution; the most negative multiplier, if any, is dropped.
                double worst = -WarmMultiplierTolerance;
                for (int i = q - 1; i >= 0; i--)
                {
                    double sum = w[i];
                    for (int k = i + 1; k < q; k++)
                    {
                        sum -= r[(k * n) + i] * u[k];
                    }

                    u[i] = sum / r[(i * n) + i];
                    if (u[i] < worst)
                    {
                        worst = u[i];
                        drop = i;
                    }
                }

                if (drop < 0)
                {
                    // Rounding-level negatives become zeros, so ratio tests never see a wrong sign.
                    for (int i = 0; i < q; i++)
                    {
                        u[i] = Math.Max(u[i], 0);
                    }

                    start.CopyTo(x);
                    for (int i = 0; i < q; i++)
                    {
                        DenseKernels.Axpy(w[i], j.Slice(i * n, n), x);
                    }

                    return drops;
                }
            }

            DropConstraint(drop, ref q, j, r, u, active, isActive);
            drops++;
        }
    }

    /// <summary>d = Jᵀn_p; z = Σ_{i≥q} d_i J_i; step = R⁻¹ d[0..q).</summary>
    private void Directions(int p, int q, Span<double> j, Span<double> r, Span<double> d, Span<double> z, Span<double> step)
    {
        int n = Variables;
        var cols = Constraints.ColumnsOf(p);
        var vals = Constraints.ValuesOf(p);
        for (int c = 0; c < n; c++)
        {
            var column = j.Slice(c * n, n);
            double sum = 0;
            for (int k = 0; k < cols.Length; k++)
            {
                sum += column[cols[k]] * vals[k];
            }

            d[c] = sum;
        }

        z.Clear();
        for (int c = q; c < n; c++)
        {
            double dc = d[c];
            if (dc == 0)
            {
                continue;
            }

            DenseKernels.Axpy(dc, j.Slice(c * n, n), z);
        }

        for (int i = q - 1; i >= 0; i--)
        {
            double sum = d[i];
            for (int k = i + 1; k < q; k++)
            {
                sum -= r[(k * n) + i] * step[k];
            }

            step[i] = sum / r[(i * n) + i];
        }
    }

    private int MostViolated(ReadOnlySpan<double> rhs, ReadOnlySpan<double> x, ReadOnlySpan<bool> isActive)
    {
        int worst = -1;
        double worstScaled = 0;
        for (int c = EqualityCount; c < Constraints.RowCount; c++)
        {
            if (isActive[c] || double.IsNegativeInfinity(rhs[c]))
            {
                continue;
            }

            // Most rows of a plan are bounds on one input: read them directly.
            double slack = (singletonColumn[c] >= 0 ? singletonValue[c] * x[singletonColumn[c]] : Constraints.Dot(c, x)) - rhs[c];
            if (slack < -FeasibilityTolerance * (1 + Math.Abs(rhs[c])))
            {
                double scaled = slack / Math.Max(Constraints.Norm(c), double.Epsilon);
                if (scaled < worstScaled)
                {
                    worstScaled = scaled;
                    worst = c;
                }
            }
        }

        return worst;
    }

    private static double Norm2Tail(ReadOnlySpan<double> d, int from, int to)
    {
        double sum = 0;
        for (int i = from; i < to; i++)
        {
            sum += d[i] * d[i];
        }

        return sum;
    }

    /// <summary>
    /// Zeroes d[q+1..n) with one Householder reflection applied to columns q … n−1 of J (2n(n−q) flops given the
    /// step direction z = J₂d₂ just computed, against 6n(n−q) for a chain of Givens rotations), then appends d[0..q]
    /// as R's new column. <paramref name="directionZ"/> must be that z; it is overwritten.
    /// </summary>
    private void AddConstraint(int p, ref int q, Span<double> j, Span<double> r, Span<double> d, Span<int> active, Span<bool> isActive, Span<double> directionZ)
    {
        int n = Variables;
        double tail = 0;
        for (int i = q + 1; i < n; i++)
        {
            tail += d[i] * d[i];
        }

        if (tail > 0)
        {
            double head = d[q];
            double norm = Math.Sqrt((head * head) + tail);
            double alpha = head > 0 ? -norm : norm;
            double v0 = head - alpha;
            double beta = 1.0 / (norm * (norm + Math.Abs(head))); // 2 / vᵀv with v = [v0, d_{q+1}, …]

            // w = J₂v. Directions left z = J₂d₂, and v differs from d₂ only in its first entry (v0 = d_q − α),
            // so w = z − α·J_q: no second pass over J₂. Then J₂ ← J₂ − β w vᵀ.
            var w = directionZ;
            DenseKernels.Axpy(-alpha, j.Slice(q * n, n), w);

            DenseKernels.Axpy(-beta * v0, w, j.Slice(q * n, n));
            for (int c = q + 1; c < n; c++)
            {
                if (d[c] != 0)
                {
                    DenseKernels.Axpy(-beta * d[c], w, j.Slice(c * n, n));
                }

                d[c] = 0;
            }

            d[q] = alpha;
        }

        var column = r.Slice(q * n, n);
        for (int i = 0; i <= q; i++)
        {
            column[i] = d[i];
        }

        active[q] = p;
        isActive[p] = true;
        q++;
    }

    /// <summary>Removes active constraint at position k and restores R to triangular form by rotations.</summary>
    private void DropConstraint(int k, ref int q, Span<double> j, Span<double> r, Span<double> u, Span<int> active, Span<bool> isActive)
    {
        int n = Variables;
        isActive[active[k]] = false;
        for (int i = k; i < q - 1; i++)
        {
            active[i] = active[i + 1];
            u[i] = u[i + 1];
            r.Slice((i + 1) * n, n).CopyTo(r.Slice(i * n, n));
        }

        q--;

        // Columns k … q−1 now have one entry below the diagonal: zero it row by row.
        for (int i = k; i < q; i++)
        {
            double a = r[(i * n) + i];
            double b = r[(i * n) + i + 1];
            if (b == 0)
            {
                continue;
            }

            double h = Math.Sqrt((a * a) + (b * b));
            double c = a / h;
            double s = b / h;
            for (int col = i; col < q; col++)
            {
                double top = r[(col * n) + i];
                double bottom = r[(col * n) + i + 1];
                r[(col * n) + i] = (c * top) + (s * bottom);
                r[(col * n) + i + 1] = (-s * top) + (c * bottom);
            }

            RotateColumns(j.Slice(i * n, n), j.Slice((i + 1) * n, n), c, s);
        }

        // Clear the stale entries left in the removed last column's slot.
        r.Slice(q * n, n).Clear();
    }

    /// <summary>[first, second] ← [c·first + s·second, −s·first + c·second], vectorised: this is the solver's inner loop.</summary>
    private static void RotateColumns(Span<double> first, Span<double> second, double c, double s)
    {
        int i = 0;
        if (System.Numerics.Vector.IsHardwareAccelerated && first.Length >= System.Numerics.Vector<double>.Count)
        {
            var cv = new System.Numerics.Vector<double>(c);
            var sv = new System.Numerics.Vector<double>(s);
            var fv = System.Runtime.InteropServices.MemoryMarshal.Cast<double, System.Numerics.Vector<double>>(first);
            var gv = System.Runtime.InteropServices.MemoryMarshal.Cast<double, System.Numerics.Vector<double>>(second);
            for (int v = 0; v < fv.Length; v++)
            {
                var a = fv[v];
                var b = gv[v];
                fv[v] = (cv * a) + (sv * b);
                gv[v] = (cv * b) - (sv * a);
            }

            i = fv.Length * System.Numerics.Vector<double>.Count;
        }

        for (; i < first.Length; i++)
        {
            double a = first[i];
            double b = second[i];
            first[i] = (c * a) + (s * b);
            second[i] = (-s * a) + (c * b);
        }
    }
}
