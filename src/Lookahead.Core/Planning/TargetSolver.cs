using System.Collections.Concurrent;
using Lookahead.Core.Numerics;
using Lookahead.Core.Optimization;
using Lookahead.Core.Validation;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// The steady-state target under the hard input limits, by the same lexicographic rule as <see cref="TargetMap"/>:
/// over the equilibria x = A x + B u with umin ≤ u ≤ umax, (1) least ‖Q^{1/2}(C x − r)‖, (2) then least ‖u‖ among
/// the stage-1 minimisers, (3) then least ‖x‖ among the stage-2 minimisers. Every stage is solved exactly by the
/// dual active-set method on a positive definite program, in the coordinates of <see cref="TargetCoordinates"/>:
/// u = T [s; c], the weighted output error depends on s only (strictly convexly), c moves the inputs without
/// moving the weighted output.
/// <para>
/// Stage 2 is "s fixed": a convex ½‖L z − g‖² takes equal values at two points of a convex set only if L z is equal
/// there — otherwise the midpoint of the two is feasible and strictly better, because the squared norm is strictly
/// convex in L z. So the stage-1 minimisers are exactly the limited equilibria whose weighted output Q^{1/2} C x
/// equals the optimal one, i.e. whose s equals the optimal s. With s fixed, stage 2 is min ½‖c‖² subject to the
/// limits (‖u‖² = ‖s‖² + ‖c‖²): identity Hessian, unique minimiser, which fixes u; stage 3 is then closed-form.
/// </para>
/// <para>
/// Stage 1 is a strictly convex program in s over Π = {s : some c puts every input inside its limits}, the shadow
/// of the limits on s. Π is not listed; it is discovered. Start from the unconstrained minimiser; while stage 2
/// finds no c for the current s, its failure names a dependency among the limit rows (λ ≥ 0 with Σ λ_j n_j^c = 0),
/// which yields an inequality gᵀs ≥ β that every point of Π satisfies and the current s breaks; add it and minimise
/// again. Each minimiser is optimal over a superset of Π, so the first one that lies in Π is optimal over Π. A cut
/// never comes back in exact arithmetic (the next minimiser meets it), and the solver reports minimal dependencies
/// (the blocking row and linearly independent active rows), of which there are finitely many: the loop ends; a
/// cap bounds it all the same. When the setpoint is reachable inside the limits, the very first point — the
/// unconstrained minimiser — passes, so the reference is then held exactly.
/// </para>
/// Immutable; any number of threads may call <see cref="Limit"/> at once (workspaces are pooled).
/// </summary>
internal sealed class TargetSolver
{
    /// <summary>
    /// When rounding makes a cut come back (the minimiser met it only to the solver's feasibility tolerance, and
    /// stage 2 still fails on the same dependency), the cut is moved into Π by this times (1 + |β|): the solver's
    /// own tolerance, so the next minimiser meets the dependency strictly. Cuts are exact otherwise — a margin on
    /// every cut would move the target by the margin times the problem's conditioning.
    /// </summary>
    internal const double CutNudge = DualActiveSetSolver.FeasibilityTolerance;

    /// <summary>
    /// The Farkas combination read back from the solver must reproduce the blocking row to this relative accuracy;
    /// far above rounding, far below any real mismatch.
    /// </summary>
    internal const double DependencyTolerance = 1e-8;

    private readonly TargetCoordinates coordinates;
    private readonly ValidatedLimits limits;
    private readonly int n;
    private readonly int p;
    private readonly double[] cRows;
    private readonly double[] particular = [];
    private readonly int disturbances;
    private readonly double[] freeStates = [];
    private readonly int freeStateCount;
    private readonly CholeskyFactor? outputFactor;
    private readonly DualActiveSetSolver? strictStage1;
    private readonly DualActiveSetSolver? stage2;
    private readonly int iterationCap;
    private readonly int cutCap;
    private readonly ConcurrentBag<TargetWorkspace> pool = new();

    /// <summary>Goldfarb–Idnani adds about one row per iteration and drops fewer; ten per row bounds the work generously.</summary>
    private const int IterationsPerRow = 10;

    /// <summary>Cuts are distinct dependencies among the 2m limit rows, in practice a few per binding limit; the cap only bounds pathological counts.</summary>
    private const int CutsPerRow = 10;

    /// <param name="e">E (n×q) of measured disturbances, or null: a disturbance's steady states are a shifted copy of the equilibria.</param>
    public TargetSolver(Matrix<double> a, Matrix<double> b, Matrix<double> c, Matrix<double> outputWeight, ValidatedLimits limits, Matrix<double>? e = null)
    {
        this.limits = limits;
        coordinates = TargetCoordinates.Build(a, b, c, outputWeight);
        n = a.RowCount;
        p = c.RowCount;
        cRows = DenseMatrix.RowMajor(c);
        if (e is { ColumnCount: > 0 })
        {
            // z_p = −[A − I, B]⁺ E v̄, the least-norm particular steady state of a disturbance (columns per disturbance),
            // and the states that stage 3 may still move: (A − I)δx = 0 with no weighted output, Q^{1/2} C δx = 0.
            int inputs = b.ColumnCount;
            var equilibrium = Matrix<double>.Build.Dense(n, n + inputs);
            equilibrium.SetSubMatrix(0, 0, a - Matrix<double>.Build.DenseIdentity(n));
            equilibrium.SetSubMatrix(0, n, b);
            particular = DenseMatrix.RowMajor(-(TargetMap.PseudoInverse(equilibrium, equilibrium.FrobeniusNorm()) * e));
            disturbances = e.ColumnCount;
            var unseen = (a - Matrix<double>.Build.DenseIdentity(n)).Stack(TargetMap.SymmetricSquareRoot(outputWeight) * c);
            var basis = TargetMap.NullSpace(unseen, Math.Max(1.0, unseen.FrobeniusNorm()));
            freeStates = DenseMatrix.RowMajor(basis.Transpose());
            freeStateCount = basis.ColumnCount;
        }

        int d = coordinates.Dimension;
        int rho = coordinates.OutputRank;
        int m = coordinates.Inputs;

        iterationCap = IterationsPerRow * (d + (2 * m) + IterationsPerRow);
        cutCap = CutsPerRow * ((2 * m) + rho + 2);
        if (rho > 0)
        {
            var curvature = coordinates.Curvature.Select(v => v * v).ToArray();
            outputFactor = new CholeskyFactor(Matrix<double>.Build.DenseOfDiagonalArray(curvature));
            if (rho == d)
            {
                // No c: the limit rows themselves bound s.
                strictStage1 = new DualActiveSetSolver(outputFactor, LimitRows(0), 0);
            }
        }

        if (d > rho)
        {
            stage2 = new DualActiveSetSolver(new CholeskyFactor(Matrix<double>.Build.DenseIdentity(d - rho)), LimitRows(rho), 0);
        }
    }

    /// <summary>
    /// Replaces the unconstrained target with the limited one when u_s breaks an input limit.
    /// Returns true when it did; false when the unconstrained target respects the limits or no equilibrium does.
    /// </summary>
    /// <param name="disturbance">v̄ (q) of a measured disturbance, or empty: the steady states are then x = A x + B u + E v̄.</param>
    /// <remarks>
    /// With v̄ every steady state is z_p + z, z an equilibrium of (A, B) and z_p the least-norm particular one. So
    /// stage 1 is the same program for r − C x_p, the limits on u = u_p + T[s; c] shift by u_p, stage 2's least
    /// ‖u_p + T[s; c]‖ over c gains the linear term T_cᵀu_p (T has orthonormal columns), and stage 3's least ‖x‖
    /// takes x_p + x with the states no stage fixes — (A − I)δx = 0 and Q^{1/2}Cδx = 0 — projected out.
    /// </remarks>
    public bool Limit(ReadOnlySpan<double> reference, Span<double> targetState, Span<double> targetInput, ReadOnlySpan<double> disturbance = default)
    {
        bool inside = true;
        for (int i = 0; i < coordinates.Inputs; i++)
        {
            double tolerance = DualActiveSetSolver.FeasibilityTolerance * (1 + Math.Abs(targetInput[i]));
            inside &= targetInput[i] >= limits.InputMin[i] - tolerance && targetInput[i] <= limits.InputMax[i] + tolerance;
        }

        if (inside || coordinates.Dimension == 0)
        {
            return false;
        }

        int m = coordinates.Inputs;
        int d = coordinates.Dimension;
        var workspace = pool.TryTake(out var pooled) ? pooled : new TargetWorkspace(coordinates, stage2);
        try
        {
            workspace.EnsureCallBuffers(m, d - coordinates.OutputRank);
            Span<double> xp = stackalloc double[n];
            Span<double> up = stackalloc double[m];
            Particular(disturbance, xp, up);
            var shifted = new double[p];
            for (int j = 0; j < p; j++)
            {
                shifted[j] = reference[j] - DenseKernels.Dot(cRows.AsSpan(j * n, n), xp);
            }

            for (int i = 0; i < m; i++)
            {
                workspace.Lower[i] = limits.InputMin[i] - up[i];
                workspace.Upper[i] = limits.InputMax[i] - up[i];
            }

            // T_cᵀu_p: the part of u_p along the inputs that leave the weighted output alone.
            var linear = workspace.Stage2Linear.AsSpan();
            linear.Clear();
            var t = coordinates.InputRows;
            for (int k = 0; k < linear.Length; k++)
            {
                for (int i = 0; i < m; i++)
                {
                    linear[k] += t[(i * d) + coordinates.OutputRank + k] * up[i];
                }
            }

            if (!Solve(shifted, workspace))
            {
                return false;
            }

            var sc = workspace.Coordinates.AsSpan();
            for (int i = 0; i < m; i++)
            {
                double u = up[i] + DenseKernels.Dot(t.AsSpan(i * sc.Length, sc.Length), sc);
                targetInput[i] = Math.Clamp(u, limits.InputMin[i], limits.InputMax[i]);
            }

            DenseKernels.Multiply(coordinates.StateFromCoordinates, sc, targetState);
            DenseKernels.MultiplyAdd(coordinates.StateFromReference, shifted, targetState);
            if (!disturbance.IsEmpty)
            {
                DenseKernels.Axpy(1.0, xp, targetState);
                ProjectOutFreeStates(targetState);
            }

            return true;
        }
        finally
        {
            pool.Add(workspace);
        }
    }

    /// <summary>x_p and u_p of the least-norm particular steady state for v̄ (zero without one).</summary>
    private void Particular(ReadOnlySpan<double> disturbance, Span<double> xp, Span<double> up)
    {
        xp.Clear();
        up.Clear();
        if (disturbance.IsEmpty || disturbances == 0)
        {
            return;
        }

        int m = coordinates.Inputs;
        for (int i = 0; i < n + m; i++)
        {
            double value = DenseKernels.Dot(particular.AsSpan(i * disturbances, disturbances), disturbance);
            if (i < n)
            {
                xp[i] = value;
            }
            else
            {
                up[i - n] = value;
            }
        }
    }

    /// <summary>x −= B Bᵀx for the orthonormal basis B of the states no stage fixes.</summary>
    private void ProjectOutFreeStates(Span<double> x)
    {
        for (int k = 0; k < freeStateCount; k++)
        {
            var direction = freeStates.AsSpan(k * n, n);
            DenseKernels.Axpy(-DenseKernels.Dot(direction, x), direction, x);
        }
    }

    /// <summary>Stages 1 and 2; writes [s; c] into the workspace. False when no equilibrium respects the limits.</summary>
    private bool Solve(ReadOnlySpan<double> reference, TargetWorkspace workspace)
    {
        int rho = coordinates.OutputRank;
        var sc = workspace.Coordinates.AsSpan();
        var s = sc[..rho];
        DenseKernels.Multiply(coordinates.UnconstrainedMap, reference, s);
        if (LeastNormInputs(s, workspace))
        {
            return true;
        }

        if (rho == 0)
        {
            return false; // the output error does not depend on the inputs, and none respect the limits
        }

        var linear = workspace.Linear.AsSpan();
        DenseKernels.Multiply(coordinates.LinearMap, reference, linear);
        for (int i = 0; i < rho; i++)
        {
            linear[i] = -linear[i];
        }

        if (strictStage1 is not null)
        {
            var rhs = workspace.LimitRhs.AsSpan();
            for (int i = 0; i < coordinates.Inputs; i++)
            {
                rhs[2 * i] = workspace.Lower[i];
                rhs[(2 * i) + 1] = -workspace.Upper[i];
            }

            return strictStage1.Solve(linear, rhs, s, unconstrained: false, iterationCap, workspace.StrictStage1(strictStage1)).Status == QpStatus.Optimal;
        }

        workspace.ClearCuts();
        for (int cut = 0; cut < cutCap; cut++)
        {
            if (!AddCut(workspace))
            {
                return false;
            }

            var rows = new SparseRows(rho, workspace.CutRows());
            var solver = new DualActiveSetSolver(outputFactor!, rows, 0);
            var result = solver.Solve(linear, workspace.CutRhs(), s, unconstrained: false, iterationCap, solver.CreateWorkspace());
            if (result.Status != QpStatus.Optimal)
            {
                return false; // Π is empty: no equilibrium has its inputs inside the limits
            }

            if (LeastNormInputs(s, workspace))
            {
                return true;
            }
        }

        return false;
    }

    /// <summary>
    /// Stage 2: least ‖c‖ with s fixed and every input inside its limits. Writes c after s in the workspace and returns
    /// true when such c exists.
    /// </summary>
    private bool LeastNormInputs(ReadOnlySpan<double> s, TargetWorkspace workspace)
    {
        int d = coordinates.Dimension;
        int rho = s.Length;
        var input = coordinates.InputRows;
        if (stage2 is null)
        {
            // No c: s alone fixes u, which must respect the limits.
            for (int i = 0; i < coordinates.Inputs; i++)
            {
                double u = DenseKernels.Dot(input.AsSpan(i * d, rho), s);
                if (u < workspace.Lower[i] - (DualActiveSetSolver.FeasibilityTolerance * (1 + Math.Abs(workspace.Lower[i])))
                    || u > workspace.Upper[i] + (DualActiveSetSolver.FeasibilityTolerance * (1 + Math.Abs(workspace.Upper[i]))))
                {
                    return false;
                }
            }

            return true;
        }

        var rhs = workspace.LimitRhs.AsSpan();
        for (int i = 0; i < coordinates.Inputs; i++)
        {
            double fixedPart = DenseKernels.Dot(input.AsSpan(i * d, rho), s);
            rhs[2 * i] = workspace.Lower[i] - fixedPart;
            rhs[(2 * i) + 1] = fixedPart - workspace.Upper[i];
        }

        // G = I; the linear term is T_cᵀu_p (zero without a disturbance, where the unconstrained minimiser is c = 0).
        var c = workspace.Coordinates.AsSpan(rho);
        var result = stage2.Solve(workspace.Stage2Linear, rhs, c, unconstrained: false, iterationCap, workspace.Stage2!);
        workspace.LastStage2 = result;
        return result.Status == QpStatus.Optimal;
    }

    /// <summary>
    /// After stage 2 failed for this s, the dual active-set solver has stopped on a blocking row p that no step can
    /// satisfy: its normal is a combination of the active rows', n_p^c = Σ_k t_k n_{A_k}^c, with every t_k ≤ 0 (no
    /// active row could give way). t is the solver's last dual step (<see cref="QpWorkspace"/>.Step, R⁻¹Jᵀn_p); the
    /// combination is checked here before it is used. So λ_p = 1, λ_{A_k} = −t_k is nonnegative with
    /// Σ λ_j n_j^c = 0, and summing λ_j (n_j^c·c ≥ β_j − n_j^s·s) shows that every s in Π satisfies
    /// (Σ λ_j n_j^s)·s ≥ Σ λ_j β_j, which the current s breaks. Adds that cut, normalised (see <see cref="CutNudge"/>
    /// for a cut that comes back). False when there is no usable combination, or when it proves Π empty.
    /// </summary>
    private bool AddCut(TargetWorkspace workspace)
    {
        var result = workspace.LastStage2;
        if (stage2 is null || result.Status != QpStatus.Infeasible || result.BlockingConstraint < 0)
        {
            return false;
        }

        int d = coordinates.Dimension;
        int rho = coordinates.OutputRank;
        int free = d - rho;
        var qp = workspace.Stage2!;
        var active = qp.ActiveConstraints(result.ActiveCount);
        var step = qp.Step.AsSpan(0, result.ActiveCount);

        var normal = workspace.CutNormal.AsSpan();
        var residual = workspace.CutResidual.AsSpan();
        normal.Clear();
        residual.Clear();
        double beta = 0;
        double size = 0;
        for (int k = -1; k < active.Length; k++)
        {
            int row = k < 0 ? result.BlockingConstraint : active[k];
            double lambda = k < 0 ? 1.0 : -step[k];
            if (lambda < 0)
            {
                return false;
            }

            int i = row / 2;
            double sign = row % 2 == 0 ? 1.0 : -1.0;
            var t = coordinates.InputRows.AsSpan(i * d, d);
            for (int j = 0; j < rho; j++)
            {
                normal[j] += lambda * sign * t[j];
            }

            for (int j = 0; j < free; j++)
            {
                residual[j] += lambda * sign * t[rho + j];
            }

            size += lambda * Math.Sqrt(DenseKernels.Dot(t, t));
            beta += lambda * (row % 2 == 0 ? workspace.Lower[i] : -workspace.Upper[i]);
        }

        double norm = Math.Sqrt(DenseKernels.Dot(normal, normal));
        double mismatch = 0;
        foreach (double v in residual)
        {
            mismatch = Math.Max(mismatch, Math.Abs(v));
        }

        // A combination whose s part vanishes as well proves that no s at all is in Π.
        if (norm <= DependencyTolerance * size || mismatch > DependencyTolerance * size || !double.IsFinite(beta))
        {
            return false;
        }

        for (int j = 0; j < rho; j++)
        {
            normal[j] /= norm;
        }

        beta /= norm;
        workspace.AddCut(normal, beta, CutNudge);
        return true;
    }

    /// <summary>Rows u_i ≥ umin_i and −u_i ≥ −umax_i over the coordinates from <paramref name="first"/> on (u = T [s; c]).</summary>
    private SparseRows LimitRows(int first)
    {
        int d = coordinates.Dimension;
        var rows = new List<IReadOnlyList<(int, double)>>();
        for (int i = 0; i < coordinates.Inputs; i++)
        {
            var lower = new List<(int, double)>();
            var upper = new List<(int, double)>();
            for (int j = first; j < d; j++)
            {
                double t = coordinates.InputRows[(i * d) + j];
                lower.Add((j - first, t));
                upper.Add((j - first, -t));
            }

            rows.Add(lower);
            rows.Add(upper);
        }

        return new SparseRows(d - first, rows);
    }
}
