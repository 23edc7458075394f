using Lookahead.Core.Numerics;
using Lookahead.Core.Optimization;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Tests.Support;

/// <summary>The answer to a general convex QP.</summary>
/// <param name="Objective">½xᵀGx + aᵀx at the solution (no constant).</param>
/// <param name="OuterIterations">Proximal steps (1 when G was positive definite).</param>
public sealed record QuadraticProgramSolution(QpStatus Status, double[] X, double Objective, int Iterations, int OuterIterations);

/// <summary>
/// General entry point for small dense convex QPs: minimise ½xᵀGx + aᵀx subject to E x = e and F x ≥ f.
/// A positive definite G goes straight to the dual active-set method. A merely semidefinite G is handled by
/// the proximal point method (Rockafellar, "Monotone operators and the proximal point algorithm", SIAM J.
/// Control Optim. 14, 1976): x_{k+1} = argmin ½xᵀGx + aᵀx + (μ/2)‖x − x_k‖², each a strictly convex QP on
/// one cached factor of G + μI, repeated until the iterates stop moving.
/// </summary>
public static class QuadraticProgram
{
    /// <summary>Proximal steps allowed: the iterates of a degenerate program creep, so the cap is generous but finite.</summary>
    public const int MaxOuterIterations = 20_000;

    /// <summary>Default active-set cap: at least this many iterations …</summary>
    private const int MinIterations = 50;

    /// <summary>… or this many per row and variable, enough for every row to enter and leave a few times.</summary>
    private const int IterationsPerSize = 3;

    /// <summary>Floor for λ_max, so the relative tests below keep a positive scale when G = 0.</summary>
    private const double SmallestScale = 1e-300;

    /// <summary>G counts as positive definite when its smallest eigenvalue exceeds this fraction of its largest (the relative 1e-10 the model validator uses for definiteness).</summary>
    private const double DefinitenessRatio = 1e-10;

    /// <summary>Proximal weight μ relative to max(1, λ_max): small enough to move fast, large enough to keep G + μI well conditioned.</summary>
    private const double ProximalWeight = 1e-3;

    /// <summary>The proximal iterates have converged when no entry moves more than this relative to max(1, ‖x‖∞).</summary>
    private const double ConvergedMove = 1e-13;

    /// <param name="rangeSpace">Solve in the range-space form (<see cref="RangeSpaceActiveSet"/>) where the program allows it (no equalities).</param>
    public static QuadraticProgramSolution Solve(double[][] g, double[] a, double[][] equalities, double[] equalityRhs, double[][] inequalities, double[] inequalityRhs, int? maxIterations = null, bool rangeSpace = false)
    {
        int n = a.Length;
        var gm = Matrix<double>.Build.DenseOfRowArrays(g);
        gm = (gm + gm.Transpose()) * 0.5;
        var rows = new List<IReadOnlyList<(int, double)>>();
        foreach (var row in equalities.Concat(inequalities))
        {
            rows.Add(row.Select((v, j) => (j, v)).ToArray());
        }

        var sparse = new SparseRows(n, rows);
        double[] rhs = [.. equalityRhs, .. inequalityRhs];
        int cap = maxIterations ?? Math.Max(MinIterations, IterationsPerSize * (rows.Count + n));

        var eigenvalues = gm.Evd(Symmetricity.Symmetric).EigenValues.Select(z => z.Real).ToArray();
        double largest = Math.Max(eigenvalues.Max(), SmallestScale);
        bool definite = eigenvalues.Min() > DefinitenessRatio * largest;
        if (definite)
        {
            var solver = new DualActiveSetSolver(new CholeskyFactor(gm), sparse, equalities.Length, rangeSpace: rangeSpace);
            var x = new double[n];
            var result = solver.Solve(a, rhs, x, unconstrained: false, cap, solver.CreateWorkspace());
            return new QuadraticProgramSolution(result.Status, x, Objective(gm, a, x), result.Iterations, 1);
        }

        double mu = ProximalWeight * Math.Max(1.0, largest);
        var regularised = new DualActiveSetSolver(new CholeskyFactor(gm + (mu * Matrix<double>.Build.DenseIdentity(n))), sparse, equalities.Length, rangeSpace: rangeSpace);
        var workspace = regularised.CreateWorkspace();
        var current = new double[n];
        var next = new double[n];
        var shifted = new double[n];
        int total = 0;
        QpResult last = default;
        for (int outer = 1; outer <= MaxOuterIterations; outer++)
        {
            for (int i = 0; i < n; i++)
            {
                shifted[i] = a[i] - (mu * current[i]);
            }

            last = regularised.Solve(shifted, rhs, next, unconstrained: false, cap, workspace);
            total += last.Iterations;
            if (last.Status != QpStatus.Optimal)
            {
                return new QuadraticProgramSolution(last.Status, next, Objective(gm, a, next), total, outer);
            }

            double move = 0;
            double size = 1;
            for (int i = 0; i < n; i++)
            {
                move = Math.Max(move, Math.Abs(next[i] - current[i]));
                size = Math.Max(size, Math.Abs(next[i]));
            }

            (current, next) = (next, current);
            if (outer > 1 && move <= ConvergedMove * size)
            {
                return new QuadraticProgramSolution(QpStatus.Optimal, current, Objective(gm, a, current), total, outer);
            }
        }

        return new QuadraticProgramSolution(QpStatus.IterationLimit, current, Objective(gm, a, current), total, MaxOuterIterations);
    }

    private static double Objective(Matrix<double> g, double[] a, double[] x)
    {
        var v = Vector<double>.Build.DenseOfArray(x);
        return (0.5 * (v * (g * v))) + (Vector<double>.Build.DenseOfArray(a) * v);
    }
}
