using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;
using static Lookahead.Core.Optimization.PointerKernels;

namespace Lookahead.Core.Optimization;

/// <summary>
/// The dual active-set method of <see cref="DualActiveSetSolver"/> (Goldfarb–Idnani) in range-space form, for
/// inequality-only programs with few enough rows that S = NG⁻¹Nᵀ (rows × rows) and W = G⁻¹Nᵀ can be kept from
/// registration. The point is x = x₀ + W_A u_A (+ the candidate's column), so it is never updated while the method
/// runs: the active set is held as the Cholesky factor L of S_AA and its inverse M = L⁻¹ (q × q each), the dual
/// direction r = S_AA⁻¹S_Ap = Mᵀ(M S_Ap) takes two triangular products with independent rows, and a row's slack is
/// its slack at x₀ plus S_cA u_A. A step then costs O(q²) instead of the O(n(n − q)) of J = L⁻ᵀQ.
/// <para>
/// The row to add is taken from a short list of the rows most violated at the last full pass over all rows
/// (<see cref="RowSweep"/>), walked once in that order: each is re-valued exactly through S, the first still violated
/// is added, and one found satisfied is left until the next pass. Only when the list is used up is x formed and every
/// row passed again. That pass is what the most-violated rule would pay on every addition; any violated row keeps the
/// method finite and its optimum the same (the program is strictly convex), only the path can differ.
/// </para>
/// Adding a row borders L by one row and M by −rᵀ/d (d the new diagonal); dropping one removes its row and column
/// from L and restores the trailing block by rotations, which applied to M's rows keep M = L⁻¹: O(q²) either way.
/// M's rows carry zeros to the end of their block of four, so the products need no scalar corners; L is kept by
/// columns, which are what a drop rotates.
/// <para>
/// Measured against the J form on the same plans (docs/performance.md): M1 with input and rate limits 22–26 µs
/// against 166–186 µs; the demo's limited plans 38–39 µs against 805 µs. The optima agree to rounding (the tests hold
/// the two forms to 1e-9); the candidate list can make the path differ.
/// </para>
/// </summary>
internal sealed unsafe class RangeSpaceActiveSet
{
    /// <summary>
    /// A candidate whose part outside the active rows' span, n_pᵀz = S_pp − ‖M S_Ap‖², is at most this × S_pp is
    /// taken as dependent on them (a dual step only). The value comes from a subtraction, so its rounding is of order
    /// 10⁻¹⁶·S_pp times the growth of M; 10⁻¹¹ leaves a margin of 10⁵ over that.
    /// </summary>
    public const double DependentTolerance = 1e-11;

    /// <summary>
    /// Largest S plus W kept per program: 2²⁰ doubles, 8 MiB (each model keeps two programs, with and without the
    /// previous input). The demo needs 345,000 (2.8 MB), M1 162,000. A bound on what a cached model holds for it:
    /// S grows with the square of the rows.
    /// </summary>
    public const long MaxEntries = 1L << 20;

    /// <summary>
    /// Rows kept from a full pass as the next candidates (see the class remarks). Measured on the demo (<c>--demo-ratios</c>,
    /// two rounds alternating; median µs per plan, mean steps): 12: 39.7–40.3, 70.6; 16: 38.5–38.6, 71.8; 24:
    /// 39.1–39.7, 74.1; 32: 40.2–40.5, 76.6. Longer lists age: more of their rows are stale by the time they are
    /// reached, and the steps grow.
    /// </summary>
    public const int CandidateListLength = 16;

    /// <summary>
    /// The optimum is refined (see <c>State.Refine</c>) only when an active row is further than this × (1 + |b_j|)
    /// from its limit: at ordinary multipliers the rows sit at rounding level and the step would change nothing.
    /// </summary>
    public const double RefineAbove = 1e-13;

    /// <summary>Work allowed to form W and S at registration, in multiply–adds (n·p·(n + p)): about a second.</summary>
    public const long MaxSetUpWork = 1L << 30;

    private readonly SparseRows rows;
    private readonly int n;
    private readonly int p;

    /// <summary>W = G⁻¹Nᵀ, row j = G⁻¹n_j.</summary>
    private readonly double[] directions;

    /// <summary>S = NG⁻¹Nᵀ, row-major.</summary>
    private readonly double[] curvature;

    /// <summary>1/‖n_j‖: violations are compared as distances.</summary>
    private readonly double[] inverseNorms;

    /// <summary>The rows laid out for full passes.</summary>
    private readonly RowSweep sweep;

    public RangeSpaceActiveSet(Numerics.CholeskyFactor factor, SparseRows rows)
    {
        this.rows = rows;
        n = factor.Size;
        p = rows.RowCount;
        directions = new double[(long)p * n];
        curvature = new double[(long)p * p];
        inverseNorms = new double[p];
        var column = new double[n];
        for (int j = 0; j < p; j++)
        {
            Array.Clear(column);
            var cols = rows.ColumnsOf(j);
            var vals = rows.ValuesOf(j);
            for (int k = 0; k < cols.Length; k++)
            {
                column[cols[k]] = vals[k];
            }

            factor.Solve(column);
            column.CopyTo(directions.AsSpan(j * n, n));
            inverseNorms[j] = 1 / Math.Max(rows.Norm(j), double.Epsilon);
        }

        for (int i = 0; i < p; i++)
        {
            for (int j = 0; j <= i; j++)
            {
                double value = rows.Dot(i, directions.AsSpan(j * n, n));
                curvature[((long)i * p) + j] = value;
                curvature[((long)j * p) + i] = value;
            }
        }

        sweep = new RowSweep(rows, inverseNorms);
    }

    /// <summary>Whether a program of this size may keep S and W, and form them at registration within <see cref="MaxSetUpWork"/>.</summary>
    public static bool Fits(int variables, int rowCount)
    {
        long entries = ((long)rowCount * rowCount) + ((long)rowCount * variables);
        return entries <= MaxEntries && entries * variables <= MaxSetUpWork;
    }

    public long Bytes => (sizeof(double) * (directions.LongLength + curvature.LongLength)) + sweep.Bytes;

    /// <summary>
    /// As <see cref="DualActiveSetSolver.Solve"/> for an inequality-only program, from the unconstrained minimiser in
    /// <paramref name="x"/>. With <paramref name="warm"/>, starts from the workspace's last active set: S_AA is factored
    /// afresh, and rows switched off, dependent or with negative multipliers are dropped until the start is dual feasible.
    /// </summary>
    public QpResult Solve(ReadOnlySpan<double> rhs, Span<double> x, int maxIterations, QpWorkspace workspace, bool warm)
    {
        var s = new State(this, workspace, rhs, x);
        int iterations = 0;
        if (warm && workspace.LastActiveCount > 0)
        {
            s.RecordBase();

            // The last solve's L and M are still in the workspace when it ended here (not in the guesser); they are
            // reused for up to MaxWarmChain solves in a row, then formed afresh so updates' rounding cannot pile up.
            bool factored = workspace.FactoredCount == workspace.LastActiveCount && workspace.WarmChain < DualActiveSetSolver.MaxWarmChain;
            workspace.WarmChain = factored ? workspace.WarmChain + 1 : 0;
            iterations = s.Resume(workspace.LastActiveCount, factored);
        }
        else
        {
            workspace.WarmChain = 0;
        }

        int candidate = -1;
        while (true)
        {
            if (candidate < 0)
            {
                // Forms x whenever it passes every row, so an optimum leaves with its point.
                candidate = s.NextCandidate();
                if (candidate < 0)
                {
                    s.Refine();
                    return new QpResult(QpStatus.Optimal, iterations, s.Count, -1);
                }

                s.U[s.Count] = 0;
            }

            if (iterations >= maxIterations)
            {
                s.FormPoint(candidate);
                return new QpResult(QpStatus.IterationLimit, iterations, s.Count, -1);
            }

            bool primalStep = s.Directions(candidate, out double curvatureLeft);
            int q = s.Count;
            var u = s.U;
            var step = s.R;

            double partial = double.PositiveInfinity;
            int blocking = -1;
            for (int i = 0; i < q; i++)
            {
                if (step[i] > 0)
                {
                    double ratio = u[i] / step[i];
                    if (ratio < partial)
                    {
                        partial = ratio;
                        blocking = i;
                    }
                }
            }

            double full = primalStep ? -s.CandidateSlack(candidate) / curvatureLeft : double.PositiveInfinity;
            double t = Math.Min(partial, full);
            if (double.IsPositiveInfinity(t))
            {
                s.FormPoint(candidate);
                return new QpResult(QpStatus.Infeasible, iterations, q, candidate);
            }

            if (double.IsNaN(t))
            {
                // Overflowed data (a state near the largest double): no row can be chosen to leave, so stop here.
                s.FormPoint(candidate);
                return new QpResult(QpStatus.NotFinite, iterations, q, -1);
            }

            for (int i = 0; i < q; i++)
            {
                u[i] -= t * step[i];
            }

            u[q] += t;
            iterations++;
            if (primalStep && full <= partial)
            {
                s.Add(candidate, curvatureLeft);
                candidate = -1;
            }
            else
            {
                double candidateMultiplier = u[q];
                s.Drop(blocking);
                s.U[s.Count] = candidateMultiplier;
            }
        }
    }

    /// <summary>One solve's working state, over the workspace's arrays.</summary>
    private ref struct State
    {
        private readonly RangeSpaceActiveSet set;
        private readonly ReadOnlySpan<double> rhs;
        private readonly Span<double> x;
        private readonly Span<double> start;
        private readonly Span<double> l;
        private readonly Span<double> m;
        private readonly Span<double> y;
        private readonly Span<double> spareRow;

        /// <summary>Row stride of M: room for each row's zeros to the end of its block of four.</summary>
        private readonly int ms;

        private readonly Span<int> active;
        private readonly Span<bool> isActive;
        private readonly Span<double> limits;
        private readonly Span<double> scaledRhs;

        /// <summary>n_jᵀx/‖n_j‖ by position at the last full pass.</summary>
        private readonly Span<double> values;

        /// <summary>n_cᵀx₀ − b_c by position: slacks at the unconstrained minimiser, recorded by the first full pass.</summary>
        private readonly Span<double> baseSlack;
        private readonly Span<int> candidates;

        /// <summary>S_pA for the row p = <see cref="rowOwner"/>, over the active rows in their order, kept through drops.</summary>
        private readonly Span<double> candidateRow;

        /// <summary>The row whose S_pA <see cref="candidateRow"/> holds (the pending candidate once chosen), or −1.</summary>
        private int rowOwner;
        private bool baseKnown;
        private readonly int n;
        private readonly int p;
        private int candidateCount;

        /// <summary>Listed rows before this one are active or were found satisfied.</summary>
        private int listHead;

        public State(RangeSpaceActiveSet set, QpWorkspace workspace, ReadOnlySpan<double> rhs, Span<double> x)
        {
            this.set = set;
            this.rhs = rhs;
            this.x = x;
            n = set.n;
            p = set.p;
            start = workspace.Start;
            x.CopyTo(start);
            l = workspace.R;
            var scratch = workspace.RangeSpaceScratch ??= new RangeSpaceScratch(set.p, set.n, CandidateListLength);
            ms = scratch.InverseStride;
            m = scratch.Inverse;
            y = scratch.Forward;
            spareRow = scratch.Spare;
            R = scratch.Direction;
            U = workspace.Multipliers;
            active = workspace.Active;
            isActive = workspace.IsActive;
            isActive.Clear();
            limits = scratch.Limits;
            scaledRhs = scratch.ScaledRhs;
            values = scratch.Values;
            candidates = scratch.Candidates;
            candidateRow = scratch.CandidateRow;
            candidateCount = 0;
            rowOwner = -1;
            baseKnown = false;
            Count = 0;
            baseSlack = scratch.BaseSlack;

            // In the pass's order, with no branch: a row switched off (b = −∞) gets −∞ for both, as Limit gives it.
            fixed (double* b = rhs, lim = limits, scaled = scaledRhs, inverse = set.sweep.InverseNormsByPosition)
            fixed (int* order = set.sweep.Order)
            {
                for (int k = 0; k < p; k++)
                {
                    double bk = b[order[k]];
                    scaled[k] = bk * inverse[k];
                    lim[k] = (bk - (DualActiveSetSolver.FeasibilityTolerance * (1 + Math.Abs(bk)))) * inverse[k];
                }
            }
        }

        /// <summary>Records the slacks at x₀ by a full pass there before a warm start needs them; the list is discarded.</summary>
        public void RecordBase()
        {
            FormPoint(-1);
            FullPass();
            candidateCount = 0;
        }

        /// <summary>Active rows.</summary>
        public int Count { get; private set; }

        /// <summary>Multipliers of the active rows, then the candidate's.</summary>
        public Span<double> U { get; }

        /// <summary>The dual direction r = S_AA⁻¹S_Ap of the last <see cref="Directions"/>.</summary>
        public Span<double> R { get; }

        /// <summary>
        /// y = M S_Ap and r = Mᵀy for candidate p; false when p is dependent on the active rows. curvatureLeft is
        /// n_pᵀz = S_pp − ‖y‖², the slack's rate of change along the primal direction z = W_p − W_A r.
        /// </summary>
        public bool Directions(int candidate, out double curvatureLeft)
        {
            int q = Count;
            var sRow = set.curvature.AsSpan(candidate * p, p);
            fixed (double* yp = y, rp = R, sp = sRow, kept = candidateRow)
            fixed (int* ap = active)
            {
                double* source = rp;
                if (rowOwner == candidate)
                {
                    source = kept;
                }
                else
                {
                    Gather(sp, ap, rp, q);
                }

                double norm2 = InverseProducts(source, yp, rp);
                double spp = sp[candidate];
                curvatureLeft = spp - norm2;

                // With q = n the active rows span every direction (the factor has no room for another row).
                return q < n && curvatureLeft > DependentTolerance * spp;
            }
        }

        /// <summary>
        /// forward = M·source and result = Mᵀ·forward (so result = S_AA⁻¹·source), returning ‖forward‖². result may be
        /// source itself (source is read in full first); forward may be neither.
        /// </summary>
        private readonly double InverseProducts(double* source, double* forward, double* result)
        {
            int q = Count;
            int padded = (q + 3) & ~3;
            for (int c = q; c < padded; c++)
            {
                source[c] = 0;
            }

            fixed (double* mp = m)
            {
                // forward = M source, four rows at a time in one pass over source: a row's entries right of its
                // diagonal are zero to the end of its block of four (see the class remarks), so every product is whole.
                var squares = Vector256<double>.Zero;
                int row = 0;
                for (; row + 4 <= q; row += 4)
                {
                    double* m0 = mp + (row * ms);
                    var block = FourDots(m0, m0 + ms, m0 + (2 * ms), m0 + (3 * ms), source, row + 4);
                    Vector256.Store(block, forward + row);
                    squares = Vector256.FusedMultiplyAdd(block, block, squares);
                }

                double norm2 = Vector256.Sum(squares);

                for (; row < q; row++)
                {
                    double value = Dot(mp + (row * ms), source, padded);
                    forward[row] = value;
                    norm2 += value * value;
                }

                // result = Mᵀ forward: result_k = Σ_{i≥k} M_ik forward_i, four entries at a time over the rows from the
                // block's own (whose entries right of the diagonal are zero) down, with four sums over alternate rows
                // so the multiply–adds do not wait on each other.
                for (int j = 0; j < q; j += 4)
                {
                    var acc0 = Vector256<double>.Zero;
                    var acc1 = Vector256<double>.Zero;
                    var acc2 = Vector256<double>.Zero;
                    var acc3 = Vector256<double>.Zero;
                    int i = j;
                    for (; i + 4 <= q; i += 4)
                    {
                        double* mi = mp + (i * ms) + j;
                        acc0 = Vector256.FusedMultiplyAdd(Vector256.Create(forward[i]), Vector256.Load(mi), acc0);
                        acc1 = Vector256.FusedMultiplyAdd(Vector256.Create(forward[i + 1]), Vector256.Load(mi + ms), acc1);
                        acc2 = Vector256.FusedMultiplyAdd(Vector256.Create(forward[i + 2]), Vector256.Load(mi + (2 * ms)), acc2);
                        acc3 = Vector256.FusedMultiplyAdd(Vector256.Create(forward[i + 3]), Vector256.Load(mi + (3 * ms)), acc3);
                    }

                    for (; i < q; i++)
                    {
                        acc0 = Vector256.FusedMultiplyAdd(Vector256.Create(forward[i]), Vector256.Load(mp + (i * ms) + j), acc0);
                    }

                    var sum = (acc0 + acc1) + (acc2 + acc3);
                    if (j + 4 <= q)
                    {
                        Vector256.Store(sum, result + j);
                    }
                    else
                    {
                        for (int lane = 0; lane < q - j; lane++)
                        {
                            result[j + lane] = sum.GetElement(lane);
                        }
                    }
                }

                return norm2;
            }
        }

        /// <summary>n_pᵀx − b_p at the present point x₀ + W_A u_A + u_q W_p for the pending candidate p.</summary>
        public readonly double CandidateSlack(int candidate)
        {
            double pending = set.curvature[((long)candidate * p) + candidate] * U[Count];
            double start = baseSlack[set.sweep.Position[candidate]] + pending;
            fixed (double* kept = candidateRow, up = U)
            {
                if (rowOwner == candidate)
                {
                    return start + Dot(kept, up, Count);
                }

                fixed (double* sp = set.curvature.AsSpan(candidate * p, p))
                fixed (int* ap = active)
                {
                    return start + GatherDot(sp, ap, up, Count);
                }
            }
        }


        /// <summary>Borders L by [y, √(n_pᵀz)] and M by [−rᵀ/d, 1/d].</summary>
        public void Add(int candidate, double curvatureLeft)
        {
            int q = Count;
            double d = Math.Sqrt(curvatureLeft);
            double inverse = 1 / d;
            fixed (double* lp = l, mRow = m.Slice(q * ms), yp = y, rp = R)
            {
                // L is kept by columns (a drop rotates its columns), so its new row is written across them.
                for (int j = 0; j < q; j++)
                {
                    lp[(j * n) + q] = yp[j];
                }

                var scale = Vector256.Create(-inverse);
                int i = 0;
                for (; i + 4 <= q; i += 4)
                {
                    Vector256.Store(Vector256.Load(rp + i) * scale, mRow + i);
                }

                for (; i < q; i++)
                {
                    mRow[i] = -rp[i] * inverse;
                }

                lp[(q * n) + q] = d;
                mRow[q] = inverse;
                for (i = q + 1; i < ((q + 4) & ~3); i++)
                {
                    mRow[i] = 0;
                }
            }

            active[q] = candidate;
            isActive[candidate] = true;
            rowOwner = rowOwner == candidate ? -1 : rowOwner;
            limits[set.sweep.Position[candidate]] = double.NegativeInfinity;
            Count = q + 1;
        }

        /// <summary>
        /// Removes active row k: the rows below it move up without their entry in column k, and the trailing block of
        /// L absorbs that column (L̃L̃ᵀ = L₂₂L₂₂ᵀ + vvᵀ) by rotations; the same rotations on M's rows keep M = L⁻¹.
        /// </summary>
        public void Drop(int k)
        {
            int q = Count;
            isActive[active[k]] = false;
            limits[set.sweep.Position[active[k]]] = Limit(active[k]);
            var v = y;
            fixed (double* lp = l, mp = m, spare = spareRow, kept = candidateRow)
            {
                // L (by columns) loses row and column k: what column k had below the diagonal is v, the columns
                // before it close up over row k, the columns after it move one column left and one row up.
                fixed (double* vp = v)
                {
                    Copy(lp + (k * n) + k + 1, vp, q - k - 1);
                }

                for (int j = 0; j < k; j++)
                {
                    Copy(lp + (j * n) + k + 1, lp + (j * n) + k, q - k - 1);
                }

                for (int j = k + 1; j < q; j++)
                {
                    Copy(lp + (j * n) + j, lp + ((j - 1) * n) + j - 1, q - j);
                }

                // M's row k is set aside; the rows below move up a slot without their entry in column k (row
                // operations commute with dropping a column).
                new Span<double>(spare, q).Clear();
                Copy(mp + (k * ms), spare, k);
                for (int i = k + 1; i < q; i++)
                {
                    double* from = mp + (i * ms);
                    double* to = from - ms;
                    Copy(from, to, k);
                    Copy(from + k + 1, to + k, i - k);

                    // Slot i − 1 now holds a row with entries 0 … i − 1; the rest of its block of four stays zero.
                    for (int c = i; c < ((i + 3) & ~3); c++)
                    {
                        to[c] = 0;
                    }

                    active[i - 1] = active[i];
                    U[i - 1] = U[i];
                }

                if (rowOwner >= 0)
                {
                    Copy(kept + k + 1, kept + k, q - k - 1);
                }

                q--;
                Count = q;

                // L's trailing block absorbs v by rotations of (column j, v); the same rotations, applied to the rows of
                // M and the set-aside row, keep M = L⁻¹ (with [L̃ 0] = L'Q, M̃ is the first rows of QᵀM without column k).
                fixed (double* vp = v)
                {
                    for (int j = k; j < q; j++)
                    {
                        double* column = lp + (j * n) + j;
                        double diagonal = column[0];
                        double vj = vp[j - k];
                        double radius = Math.Sqrt((diagonal * diagonal) + (vj * vj));
                        double c = diagonal / radius;
                        double s = vj / radius;
                        column[0] = radius;
                        Rotate(column + 1, vp + (j - k + 1), q - j - 1, c, s);
                        Rotate(mp + (j * ms), spare, j + 1, c, s);
                    }
                }
            }
        }

        /// <summary>[a; b] ← [c·a + s·b; −s·a + c·b] over <paramref name="length"/> entries, four at a time.</summary>
        private static void Rotate(double* a, double* b, int length, double c, double s)
        {
            int i = 0;
            var cv = Vector256.Create(c);
            var sv = Vector256.Create(s);
            for (; i + 4 <= length; i += 4)
            {
                var av = Vector256.Load(a + i);
                var bv = Vector256.Load(b + i);
                Vector256.Store((cv * av) + (sv * bv), a + i);
                Vector256.Store((cv * bv) - (sv * av), b + i);
            }

            for (; i < length; i++)
            {
                double av = a[i];
                a[i] = (c * av) + (s * b[i]);
                b[i] = (c * b[i]) - (s * av);
            }
        }

        /// <summary>
        /// One step of iterative refinement at the optimum, just after the full pass that found no row violated: the
        /// active rows' residuals at the formed x, measured on the rows themselves, are taken out along W_A
        /// (Δu = −S_AA⁻¹(N_Ax − b_A)). x = x₀ + W_Au sums terms far larger than x when the multipliers are huge (soft
        /// limits at a raised weight: x₀'s slacks at −ρ/w), and the sum's rounding would otherwise stay in the plan; the
        /// correction is small, so its own rounding is too.
        /// </summary>
        public void Refine()
        {
            int q = Count;
            if (q == 0)
            {
                return;
            }

            // The last full pass was made at this x: its values tell whether any active row is off its limit; only
            // then are the residuals taken row by row, as the step needs them.
            bool off = false;
            for (int i = 0; i < q && !off; i++)
            {
                int k = set.sweep.Position[active[i]];
                double b = rhs[active[i]];
                off = Math.Abs(b - (values[k] * set.sweep.NormsByPosition[k])) > RefineAbove * (1 + Math.Abs(b));
            }

            if (!off)
            {
                return;
            }

            fixed (double* xp = x)
            {
                for (int i = 0; i < q; i++)
                {
                    y[i] = rhs[active[i]] - set.sweep.RowDot(active[i], xp);
                }
            }

            // Δu = S_AA⁻¹(b_A − N_Ax), into R.
            fixed (double* yp = y, zp = spareRow, rp = R)
            {
                InverseProducts(yp, zp, rp);
            }

            for (int i = 0; i < q; i++)
            {
                U[i] = Math.Max(U[i] + R[i], 0);
                Numerics.DenseKernels.Axpy(R[i], set.directions.AsSpan(active[i] * n, n), x);
            }
        }

        /// <summary>
        /// Warm start from the first <paramref name="kept"/> rows of the active list. With <paramref name="factored"/>,
        /// L and M in the workspace are those rows' and are kept, rows switched off being dropped from them; otherwise
        /// they are bordered again row by row, leaving out rows switched off or dependent on earlier ones. Then
        /// u = S_AA⁻¹(b_A − N_Ax₀), dropping the most negative multiplier until none is left. Returns the rows left out
        /// (they count as iterations).
        /// </summary>
        public int Resume(int kept, bool factored)
        {
            int drops = 0;
            if (factored)
            {
                Count = kept;
                for (int i = 0; i < kept; i++)
                {
                    isActive[active[i]] = true;
                    limits[set.sweep.Position[active[i]]] = double.NegativeInfinity;
                }

                for (int i = kept - 1; i >= 0; i--)
                {
                    if (double.IsNegativeInfinity(rhs[active[i]]))
                    {
                        Drop(i);
                        drops++;
                    }
                }
            }
            else
            {
                for (int i = 0; i < kept; i++)
                {
                    int j = active[i];
                    if (double.IsNegativeInfinity(rhs[j]) || !Directions(j, out double left))
                    {
                        drops++;
                        continue;
                    }

                    Add(j, left);
                }
            }

            while (true)
            {
                int q = Count;
                for (int i = 0; i < q; i++)
                {
                    y[i] = -baseSlack[set.sweep.Position[active[i]]];
                }

                // u = S_AA⁻¹(b_A − N_Ax₀).
                fixed (double* yp = y, zp = spareRow, up = U)
                {
                    InverseProducts(yp, zp, up);
                }

                int drop = -1;
                double worst = -1e-14;
                for (int k = 0; k < q; k++)
                {
                    if (U[k] < worst)
                    {
                        worst = U[k];
                        drop = k;
                    }
                }

                if (drop < 0)
                {
                    for (int k = 0; k < q; k++)
                    {
                        U[k] = Math.Max(U[k], 0);
                    }

                    return drops;
                }

                Drop(drop);
                drops++;
            }
        }

        /// <summary>
        /// The next row to add: the first listed row still violated, re-valued through S; when none is, a full pass at
        /// the formed point refills the list and its most violated row is taken. −1 when no row is violated.
        /// </summary>
        public int NextCandidate()
        {
            // The list is taken in order, most violated at its pass first; a row found satisfied is not looked at
            // again before the next pass. The row looked at has its S_cA gathered, kept if it is taken.
            for (; listHead < candidateCount; listHead++)
            {
                int c = candidates[listHead];
                if (isActive[c])
                {
                    continue;
                }

                GatherCandidateRow(c);
                double slack;
                fixed (double* kept = candidateRow, up = U)
                {
                    slack = baseSlack[set.sweep.Position[c]] + Dot(kept, up, Count);
                }

                if (slack < -DualActiveSetSolver.FeasibilityTolerance * (1 + Math.Abs(rhs[c])))
                {
                    return c;
                }
            }

            FormPoint(-1);
            int best = FullPass();
            listHead = 0;
            rowOwner = -1;
            if (best >= 0)
            {
                GatherCandidateRow(best);
            }

            return best;
        }

        /// <summary>S_cA into <see cref="candidateRow"/>, which row c then owns.</summary>
        private void GatherCandidateRow(int c)
        {
            fixed (double* kept = candidateRow, s = set.curvature)
            fixed (int* ap = active)
            {
                Gather(s + ((long)c * p), ap, kept, Count);
            }

            rowOwner = c;
        }

        /// <summary>x = x₀ + W_A u_A (+ u_q W_p while a candidate is pending), q + 1 directions summed per register.</summary>
        public void FormPoint(int candidate)
        {
            int q = Count;
            fixed (double* xp = x, x0 = start, w = set.directions, up = U)
            fixed (int* ap = active)
            {
                // Sixteen entries of x at a time: four independent sums, so the multiply–adds are not waiting on each other.
                int c = 0;
                for (; c + 16 <= n; c += 16)
                {
                    var acc0 = Vector256.Load(x0 + c);
                    var acc1 = Vector256.Load(x0 + c + 4);
                    var acc2 = Vector256.Load(x0 + c + 8);
                    var acc3 = Vector256.Load(x0 + c + 12);
                    for (int i = 0; i < q; i++)
                    {
                        var coefficient = Vector256.Create(up[i]);
                        double* wi = w + ((long)ap[i] * n) + c;
                        acc0 = Vector256.FusedMultiplyAdd(coefficient, Vector256.Load(wi), acc0);
                        acc1 = Vector256.FusedMultiplyAdd(coefficient, Vector256.Load(wi + 4), acc1);
                        acc2 = Vector256.FusedMultiplyAdd(coefficient, Vector256.Load(wi + 8), acc2);
                        acc3 = Vector256.FusedMultiplyAdd(coefficient, Vector256.Load(wi + 12), acc3);
                    }

                    Vector256.Store(acc0, xp + c);
                    Vector256.Store(acc1, xp + c + 4);
                    Vector256.Store(acc2, xp + c + 8);
                    Vector256.Store(acc3, xp + c + 12);
                }

                for (; c + 4 <= n; c += 4)
                {
                    var acc = Vector256.Load(x0 + c);
                    for (int i = 0; i < q; i++)
                    {
                        acc = Vector256.FusedMultiplyAdd(Vector256.Create(up[i]), Vector256.Load(w + ((long)ap[i] * n) + c), acc);
                    }

                    Vector256.Store(acc, xp + c);
                }

                for (; c < n; c++)
                {
                    double sum = x0[c];
                    for (int i = 0; i < q; i++)
                    {
                        sum += up[i] * w[((long)ap[i] * n) + c];
                    }

                    xp[c] = sum;
                }

                if (candidate >= 0)
                {
                    Numerics.DenseKernels.Axpy(up[q], set.directions.AsSpan(candidate * n, n), x);
                }
            }
        }

        /// <summary>
        /// Every row at the formed point: keeps the <see cref="CandidateListLength"/> most violated (by distance) and
        /// returns the worst, or −1. Active rows and rows switched off have limit −∞ and never count.
        /// </summary>
        private int FullPass()
        {
            int length = candidates.Length;
            double* kept = stackalloc double[length];
            int count = 0;
            double entry = double.PositiveInfinity;
            bool record = !baseKnown;
            baseKnown = true;
            fixed (double* xp = x, value = values, lim = limits, scaled = scaledRhs, base0 = baseSlack, norms = set.sweep.NormsByPosition)
            fixed (int* list = candidates, order = set.sweep.Order)
            {
                set.sweep.Values(xp, value);
                int k = 0;

                // Four rows at a time; the (rare) rows that are violated and enter the list are taken one by one.
                for (; k + 4 <= p; k += 4)
                {
                    var v = Vector256.Load(value + k);
                    var violation = v - Vector256.Load(scaled + k);
                    if (record)
                    {
                        Vector256.Store(violation * Vector256.Load(norms + k), base0 + k);
                    }

                    var enters = Vector256.LessThan(v, Vector256.Load(lim + k)) & Vector256.LessThan(violation, Vector256.Create(entry));
                    uint lanes = enters.ExtractMostSignificantBits();
                    while (lanes != 0)
                    {
                        int lane = System.Numerics.BitOperations.TrailingZeroCount(lanes);
                        lanes &= lanes - 1;
                        double d = violation.GetElement(lane);
                        if (d < entry)
                        {
                            Keep(kept, list, length, ref count, ref entry, order[k + lane], d);
                        }
                    }
                }

                for (; k < p; k++)
                {
                    double violation = value[k] - scaled[k];
                    if (record)
                    {
                        base0[k] = violation * norms[k];
                    }

                    if (value[k] < lim[k] && violation < entry)
                    {
                        Keep(kept, list, length, ref count, ref entry, order[k], violation);
                    }
                }
            }

            candidateCount = count;
            return count > 0 ? candidates[0] : -1;
        }

        /// <summary>Inserts row c into the list (most violated first), dropping the last when full; entry is the bar to join.</summary>
        private static void Keep(double* kept, int* list, int length, ref int count, ref double entry, int c, double violation)
        {
            int at = Math.Min(count, length - 1);
            while (at > 0 && kept[at - 1] > violation)
            {
                kept[at] = kept[at - 1];
                list[at] = list[at - 1];
                at--;
            }

            kept[at] = violation;
            list[at] = c;
            count = Math.Min(count + 1, length);
            entry = count == length ? kept[length - 1] : double.PositiveInfinity;
        }

        /// <summary>The scaled value below which row c counts as violated: (b_c − tol·(1 + |b_c|))/‖n_c‖, or −∞ when off.</summary>
        private readonly double Limit(int c) =>
            double.IsNegativeInfinity(rhs[c]) ? double.NegativeInfinity : (rhs[c] - (DualActiveSetSolver.FeasibilityTolerance * (1 + Math.Abs(rhs[c])))) * set.inverseNorms[c];
    }
}
