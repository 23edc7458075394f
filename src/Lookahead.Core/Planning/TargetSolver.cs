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

    public TargetSolver(Matrix<double> a, Matrix<double> b, Matrix<double> c, Matrix<double> outputWeight, ValidatedLimits limits)
    {
        this.limits = limits;
        coordinates = TargetCoordinates.Build(a, b, c, outputWeight);
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
    public bool Limit(ReadOnlySpan<double> reference, Span<double> targetState, Span<double> targetInput)
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

        var workspace = pool.TryTake(out var pooled) ? pooled : new TargetWorkspace(coordinates, stage2);
        try
        {
            if (!Solve(reference, workspace))
            {
                return false;
            }

            var sc = workspace.Coordinates.AsSpan();
            var input = coordinates.InputRows;
            for (int i = 0; i < coordinates.Inputs; i++)
            {
                double u = DenseKernels.Dot(input.AsSpan(i * sc.Length, sc.Length), sc);
                targetInput[i] = Math.Clamp(u, limits.InputMin[i], limits.InputMax[i]);
            }

            DenseKernels.Multiply(coordinates.StateFromCoordinates, sc, targetState);
            DenseKernels.MultiplyAdd(coordinates.StateFromReference, reference, targetState);
            return true;
        }
        finally
        {
            pool.Add(workspace);
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
                rhs[2 * i] = limits.InputMin[i];
                rhs[(2 * i) + 1] = -limits.InputMax[i];
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
                if (u < limits.InputMin[i] - (DualActiveSetSolver.FeasibilityTolerance * (1 + Math.Abs(limits.InputMin[i])))
                    || u > limits.InputMax[i] + (DualActiveSetSolver.FeasibilityTolerance * (1 + Math.Abs(limits.InputMax[i]))))
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
            rhs[2 * i] = limits.InputMin[i] - fixedPart;
            rhs[(2 * i) + 1] = fixedPart - limits.InputMax[i];
        }

        // G = I and no linear term: the unconstrained minimiser is c = 0.
        var c = workspace.Coordinates.AsSpan(rho);
        c.Clear();
        var result = stage2.Solve([], rhs, c, unconstrained: true, iterationCap, workspace.Stage2!);
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
            beta += lambda * (row % 2 == 0 ? limits.InputMin[i] : -limits.InputMax[i]);
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
