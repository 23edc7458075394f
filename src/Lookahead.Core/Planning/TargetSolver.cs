using Lookahead.Core.Numerics;
using Lookahead.Core.Optimization;
using Lookahead.Core.Validation;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// Steady-state target under the hard input limits, as a small QP solved by the same dual active-set method:
/// minimise (C x_s − r)ᵀQ(C x_s − r) + δ‖[x_s; u_s]‖² subject to (A − I)x_s + B u_s = 0 and umin ≤ u_s ≤ umax.
/// δ = 10⁻⁹·max(1, ‖CᵀQC‖_F) only makes the program strictly convex; it is used only when the unconstrained
/// target (exact, lexicographic) breaks an input limit.
/// </summary>
internal sealed class TargetSolver
{
    private readonly int n;
    private readonly int m;
    private readonly int p;
    private readonly ValidatedLimits limits;
    private readonly DualActiveSetSolver solver;
    private readonly double[] cz; // p × (n+m) row-major: [C 0]
    private readonly double[] q;
    private readonly int equalities;

    public TargetSolver(Matrix<double> a, Matrix<double> b, Matrix<double> c, Matrix<double> outputWeight, ValidatedLimits limits)
    {
        n = a.RowCount;
        m = b.ColumnCount;
        p = c.RowCount;
        this.limits = limits;
        var build = Matrix<double>.Build;
        var czMatrix = build.Dense(p, n + m);
        czMatrix.SetSubMatrix(0, 0, c);
        var normal = czMatrix.TransposeThisAndMultiply(outputWeight * czMatrix);
        double delta = 1e-9 * Math.Max(1.0, normal.FrobeniusNorm());
        var g = (normal + normal.Transpose()) + (2 * delta * build.DenseIdentity(n + m));
        cz = DenseMatrix.RowMajor(czMatrix);
        q = DenseMatrix.RowMajor(outputWeight);

        var rows = new List<IReadOnlyList<(int, double)>>();
        for (int i = 0; i < n; i++)
        {
            var row = new List<(int, double)>();
            for (int j = 0; j < n; j++)
            {
                row.Add((j, a[i, j] - (i == j ? 1.0 : 0.0)));
            }

            for (int j = 0; j < m; j++)
            {
                row.Add((n + j, b[i, j]));
            }

            rows.Add(row);
        }

        equalities = n;
        for (int i = 0; i < m; i++)
        {
            rows.Add([(n + i, 1.0)]);
            rows.Add([(n + i, -1.0)]);
        }

        solver = new DualActiveSetSolver(new CholeskyFactor(g), new SparseRows(n + m, rows), equalities);
    }

    /// <summary>
    /// Replaces the unconstrained target with the limited one when u_s breaks an input limit.
    /// Returns true when it did.
    /// </summary>
    public bool Limit(ReadOnlySpan<double> reference, Span<double> targetState, Span<double> targetInput)
    {
        bool inside = true;
        for (int i = 0; i < m; i++)
        {
            double tolerance = DualActiveSetSolver.FeasibilityTolerance * (1 + Math.Abs(targetInput[i]));
            inside &= targetInput[i] >= limits.InputMin[i] - tolerance && targetInput[i] <= limits.InputMax[i] + tolerance;
        }

        if (inside)
        {
            return false;
        }

        // a = −2·[C 0]ᵀQr (the half-gradient convention: G = 2(CzᵀQCz + δI)).
        var linear = new double[n + m];
        Span<double> qr = stackalloc double[p];
        DenseKernels.Multiply(q, reference, qr);
        for (int i = 0; i < p; i++)
        {
            for (int j = 0; j < n + m; j++)
            {
                linear[j] -= 2 * cz[(i * (n + m)) + j] * qr[i];
            }
        }

        var rhs = new double[equalities + (2 * m)];
        for (int i = 0; i < m; i++)
        {
            rhs[equalities + (2 * i)] = double.IsFinite(limits.InputMin[i]) ? limits.InputMin[i] : double.NegativeInfinity;
            rhs[equalities + (2 * i) + 1] = double.IsFinite(limits.InputMax[i]) ? -limits.InputMax[i] : double.NegativeInfinity;
        }

        var z = new double[n + m];
        var result = solver.Solve(linear, rhs, z, unconstrained: false, 10 * (n + m + 10), solver.CreateWorkspace());
        if (result.Status != QpStatus.Optimal)
        {
            return false;
        }

        z.AsSpan(0, n).CopyTo(targetState);
        z.AsSpan(n, m).CopyTo(targetInput);
        return true;
    }
}
