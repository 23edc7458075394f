using Lookahead.Core.Numerics;

namespace Lookahead.Core.Optimization;

/// <summary>
/// A first attempt at a cold solve of the dual active-set method's program that changes many constraints per
/// iteration: the primal–dual active-set method (Hintermüller, Ito &amp; Kunisch, "The primal-dual active set strategy
/// as a semismooth Newton method", SIAM J. Optim. 13(3), 2003) applied to the program's dual. With
/// x(λ) = x₀ + G⁻¹Nᵀλ (x₀ the unconstrained minimiser) the slacks are s(λ) = c + Sλ, c = Nx₀ − b, S = NG⁻¹Nᵀ.
/// S depends only on G and the normals, so it is formed once per program; an iteration then takes a guess A of the
/// active set, solves S_AA λ_A = −c_A (λ = 0 off A), and keeps the rows of A with λ ≥ 0 and adds the rows outside A
/// with s &lt; 0, most violated first. S_AA is factored by bordering, one row at a time, so a row dependent on those
/// before it is left out as it comes, and the rows kept ahead of the first one dropped keep their part of the factor.
/// The first guess is the rows x₀ violates (or, for a warm start, the previous solve's set). A guess that reproduces itself satisfies every KKT condition, so the point is the optimum (the
/// program is strictly convex) — checked once more on x itself against the normals before it is accepted.
/// <para>
/// The method is not guaranteed to settle (it may cycle when S is not an M-matrix) and a guess with dependent rows has
/// a singular S_AA: either way it gives up after <see cref="MaxIterations"/> and the caller runs the dual active-set
/// method, which always finishes. An iteration costs |A|³/6 + p·|A| flops (p rows) however many rows change, against
/// the dual active-set method's one row per iteration.
/// </para>
/// Immutable after construction; per-solve memory comes from the caller's <see cref="QpWorkspace"/>.
/// </summary>
internal sealed class PrimalDualActiveSet
{
    /// <summary>
    /// Rows above which S (p² numbers) is not formed: 1,000 rows hold 8 MB per program (plus G⁻¹n_j, p·n numbers).
    /// Larger programs go straight to the dual active-set method.
    /// </summary>
    public const int MaxRows = 1000;

    /// <summary>
    /// Guesses per solve. Plans that settle do so in 2–6 here; one that has not by then is likely cycling, and the
    /// dual active-set method finishes it from scratch.
    /// </summary>
    public const int MaxIterations = 12;

    /// <summary>
    /// A pivot of S_AA whose square is below this × its diagonal entry marks the guessed rows as (nearly) dependent:
    /// the multipliers would be ill-determined, so the dual active-set method, which handles dependence, takes over.
    /// </summary>
    private const double DependentPivot = 1e-12;

    private readonly int n;
    private readonly int maxIterations;
    private readonly SparseRows rows;
    private readonly double[] schur;

    /// <summary>G⁻¹n_j for every row j (n numbers each, row j at j·n), so the final point is |A| axpys away from x₀.</summary>
    private readonly double[] directions;

    /// <param name="rows">The inequality normals n_j (no equalities).</param>
    /// <param name="initialJ">L⁻ᵀ column-major (column c at c·n) for G = LLᵀ, as the dual active-set method keeps it.</param>
    /// <param name="maxIterations">Guesses per solve before giving up.</param>
    public PrimalDualActiveSet(SparseRows rows, ReadOnlySpan<double> initialJ, int maxIterations = MaxIterations)
    {
        int p = rows.RowCount;
        n = rows.ColumnCount;
        if (p > MaxRows)
        {
            throw new ArgumentOutOfRangeException(nameof(rows), $"{p} rows; at most {MaxRows}");
        }

        this.rows = rows;
        this.maxIterations = maxIterations;

        // V = N L⁻ᵀ (p×n, row-major), so S = N G⁻¹ Nᵀ = V Vᵀ. Row j of V is Σ_k n_jk · (row k of L⁻ᵀ) ... read from
        // the column-major L⁻ᵀ as V[j, c] = Σ_k n_jk J₀[c·n + k].
        var v = new double[p * n];
        for (int j = 0; j < p; j++)
        {
            var columns = rows.ColumnsOf(j);
            var values = rows.ValuesOf(j);
            var target = v.AsSpan(j * n, n);
            for (int c = 0; c < n; c++)
            {
                var column = initialJ.Slice(c * n, n);
                double sum = 0;
                for (int e = 0; e < columns.Length; e++)
                {
                    sum += values[e] * column[columns[e]];
                }

                target[c] = sum;
            }
        }

        // G⁻¹n_j = J₀J₀ᵀn_j = J₀ (row j of V)ᵀ: W = J₀Vᵀ, column-major n×p, column j at j·n.
        directions = new double[p * n];
        DenseLinearAlgebra.Default.Multiply(false, false, n, p, n, 1.0, initialJ, n, v, n, 0.0, directions, n);
        schur = new double[p * p];
        // Column-major, v is Vᵀ (n×p, leading dimension n): S = (Vᵀ)ᵀVᵀ.
        DenseLinearAlgebra.Default.Multiply(true, false, p, p, n, 1.0, v, n, v, n, 0.0, schur, p);
    }

    /// <summary>Memory held by S and the rows' directions for a program of this size.</summary>
    public static long BytesFor(int rowCount, int variables) => sizeof(double) * (long)rowCount * (rowCount + variables);

    public long Bytes => BytesFor(rows.RowCount, n);


    /// <summary>
    /// Tries to solve the program from the unconstrained minimiser in <paramref name="x"/>.
    /// </summary>
    /// <param name="rhs">b; −∞ switches a row off.</param>
    /// <param name="x">On entry x₀; on success the optimum (untouched otherwise).</param>
    /// <param name="guess">The first guess of the active set; empty starts from the rows x₀ violates.</param>
    /// <param name="workspace">Scratch; on success its active set and multipliers describe the optimum.</param>
    /// <param name="count">Size of the active set found.</param>
    /// <param name="iterations">Guesses made (also on failure).</param>
    /// <returns>True when the optimum was found and checked.</returns>
    public bool TrySolve(ReadOnlySpan<double> rhs, Span<double> x, ReadOnlySpan<int> guess, QpWorkspace workspace, out int count, out int iterations)
    {
        int p = rows.RowCount;
        var scratch = workspace.ActiveSetGuess ??= new ActiveSetGuessScratch(n, p);
        var c = scratch.Offsets.AsSpan(0, p);
        var s = scratch.Slacks.AsSpan(0, p);
        var inSet = scratch.InSet.AsSpan(0, p);
        var set = scratch.Set.AsSpan();
        var lambda = scratch.Lambda.AsSpan();
        var l = scratch.Factor.AsSpan();
        var violations = scratch.Violations.AsSpan(0, p);
        var violated = scratch.Violated.AsSpan(0, p);
        count = 0;
        iterations = 0;

        for (int j = 0; j < p; j++)
        {
            c[j] = double.IsNegativeInfinity(rhs[j]) ? double.PositiveInfinity : rows.Dot(j, x) - rhs[j];
        }

        // The first guess: the given rows, else the rows x₀ violates, most violated first (see Extend).
        int q = 0;
        inSet.Clear();
        if (!guess.IsEmpty)
        {
            foreach (int j in guess)
            {
                if (q < n && !double.IsPositiveInfinity(c[j]) && !inSet[j])
                {
                    inSet[j] = true;
                    set[q++] = j;
                }
            }
        }
        else
        {
            q = AddViolated(c, rhs, inSet, set, 0, violations, violated);
        }

        int factored = 0;
        for (int pass = 0; pass < maxIterations; pass++)
        {
            // A pass with nothing guessed only reads the offsets: like the dual active-set method, a program whose
            // unconstrained minimiser breaks no row takes no iterations.
            iterations += q > 0 ? 1 : 0;
            bool skipped = Extend(set, ref q, factored, inSet, l);
            factored = q;
            Multipliers(c, set[..q], l, lambda);

            // s = c + S_{:,A} λ_A, one row of the symmetric S per active row.
            c.CopyTo(s);
            for (int k = 0; k < q; k++)
            {
                DenseKernels.Axpy(lambda[k], schur.AsSpan(set[k] * p, p), s);
            }

            // Rows with negative multipliers leave; L's rows before the first of them stay valid.
            int kept = 0;
            for (int k = 0; k < q; k++)
            {
                if (lambda[k] >= 0)
                {
                    set[kept] = set[k];
                    lambda[kept] = lambda[k];
                    kept++;
                }
                else
                {
                    inSet[set[k]] = false;
                    factored = Math.Min(factored, k);
                }
            }

            bool dropped = kept < q;
            int total = AddViolated(s, rhs, inSet, set, kept, violations, violated);
            if (!dropped && total == kept && !skipped)
            {
                return Accept(rhs, x, set[..kept], lambda[..kept], workspace, out count);
            }

            q = total;
        }
        return false;
    }

    private static double Tolerance(double rhs) => DualActiveSetSolver.FeasibilityTolerance * (1 + Math.Abs(rhs));

    /// <summary>
    /// Appends the rows outside the set with s &lt; 0 (beyond tolerance) after set[..count], most violated (per unit
    /// normal) first and no more than the variables allow; returns the new size.
    /// </summary>
    private int AddViolated(ReadOnlySpan<double> slacks, ReadOnlySpan<double> rhs, Span<bool> inSet, Span<int> set, int count, Span<double> violations, Span<int> violated)
    {
        int found = 0;
        for (int j = 0; j < slacks.Length; j++)
        {
            if (!inSet[j] && slacks[j] < -Tolerance(rhs[j]) && !double.IsNegativeInfinity(rhs[j]))
            {
                violations[found] = slacks[j] / rows.Norm(j);
                violated[found++] = j;
            }
        }

        violations[..found].Sort(violated[..found]);
        int room = Math.Min(found, n - count);
        for (int k = 0; k < room; k++)
        {
            inSet[violated[k]] = true;
            set[count + k] = violated[k];
        }

        return count + room;
    }

    /// <summary>
    /// Extends the Cholesky factor of S_AA (row-major, row i at i·n) from row <paramref name="factored"/> to the end of
    /// the set, one bordered row at a time; a row (nearly) dependent on those before it is left out of the set.
    /// Returns whether any was.
    /// </summary>
    private bool Extend(Span<int> set, ref int q, int factored, Span<bool> inSet, Span<double> l)
    {
        int p = rows.RowCount;
        int w = factored;
        bool skipped = false;
        for (int k = factored; k < q; k++)
        {
            int row = set[k];
            var schurRow = schur.AsSpan(row * p, p);
            var li = l.Slice(w * n, w + 1);
            for (int i = 0; i < w; i++)
            {
                li[i] = (schurRow[set[i]] - DenseKernels.Dot(li[..i], l.Slice(i * n, i))) / l[(i * n) + i];
            }

            double diagonal = schurRow[row];
            double pivot = diagonal - DenseKernels.Dot(li[..w], li[..w]);
            if (!(pivot > DependentPivot * diagonal))
            {
                inSet[row] = false;
                skipped = true;
                continue;
            }

            li[w] = Math.Sqrt(pivot);
            set[w++] = row;
        }

        q = w;
        return skipped;
    }

    /// <summary>λ_A = −S_AA⁻¹ c_A with the factor in <paramref name="l"/>.</summary>
    private void Multipliers(ReadOnlySpan<double> c, ReadOnlySpan<int> set, ReadOnlySpan<double> l, Span<double> lambda)
    {
        int q = set.Length;
        for (int i = 0; i < q; i++)
        {
            lambda[i] = (-c[set[i]] - DenseKernels.Dot(l.Slice(i * n, i), lambda[..i])) / l[(i * n) + i];
        }

        for (int i = q - 1; i >= 0; i--)
        {
            double value = lambda[i] / l[(i * n) + i];
            lambda[i] = value;
            var row = l.Slice(i * n, i);
            for (int k = 0; k < i; k++)
            {
                lambda[k] -= row[k] * value;
            }
        }
    }

    /// <summary>
    /// x = x₀ + G⁻¹N_Aᵀλ_A, accepted only when every row holds on x itself to the dual active-set method's tolerance
    /// (S was formed once and rounds differently from x); then the workspace reports A and λ_A.
    /// </summary>
    private bool Accept(ReadOnlySpan<double> rhs, Span<double> x, ReadOnlySpan<int> set, ReadOnlySpan<double> lambda, QpWorkspace workspace, out int count)
    {
        count = 0;
        var step = workspace.Step.AsSpan(0, n);
        step.Clear();
        for (int k = 0; k < set.Length; k++)
        {
            DenseKernels.Axpy(lambda[k], directions.AsSpan(set[k] * n, n), step);
        }

        var candidate = workspace.Start.AsSpan(0, n);
        x.CopyTo(candidate);
        DenseKernels.Axpy(1.0, step, candidate);
        for (int j = 0; j < rows.RowCount; j++)
        {
            if (!double.IsNegativeInfinity(rhs[j]) && rows.Dot(j, candidate) - rhs[j] < -Tolerance(rhs[j]))
            {
                return false;
            }
        }

        candidate.CopyTo(x);
        set.CopyTo(workspace.Active);
        lambda.CopyTo(workspace.Multipliers);
        count = set.Length;
        return true;
    }
}
