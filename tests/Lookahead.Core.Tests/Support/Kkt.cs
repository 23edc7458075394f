using Lookahead.Core.Optimization;
using Lookahead.Core.Planning;
using MathNet.Numerics.LinearAlgebra;
using Xunit;

namespace Lookahead.Core.Tests.Support;

/// <summary>
/// An independent check of the Karush–Kuhn–Tucker conditions for min ½xᵀGx + aᵀx s.t. n_jᵀx = b_j (j &lt; meq),
/// n_jᵀx ≥ b_j: it finds the active rows itself, fits multipliers by least squares and checks stationarity,
/// primal and dual feasibility and complementarity — so a wrong active set in the solver cannot pass.
/// </summary>
public static class Kkt
{
    /// <param name="gradient">Gx + a at the solution.</param>
    public static void Check(double[] gradient, SparseRows rows, double[] rhs, int equalities, double[] x, double tolerance = 1e-8, string what = "")
    {
        int n = x.Length;
        double gradientScale = Math.Max(1.0, gradient.Select(Math.Abs).Max());
        var active = new List<int>();
        for (int j = 0; j < rows.RowCount; j++)
        {
            if (double.IsNegativeInfinity(rhs[j]))
            {
                continue;
            }

            double slack = rows.Dot(j, x) - rhs[j];
            double scale = 1 + Math.Abs(rhs[j]) + (rows.Norm(j) * x.Select(Math.Abs).DefaultIfEmpty(0).Max());
            if (j < equalities)
            {
                Assert.True(Math.Abs(slack) <= tolerance * scale, $"{what}: equality {j} violated by {slack:g3}");
                active.Add(j);
            }
            else
            {
                Assert.True(slack >= -tolerance * scale, $"{what}: inequality {j} violated by {slack:g3}");
                if (slack <= 1e-9 * scale)
                {
                    active.Add(j);
                }
            }
        }

        // Stationarity: gradient = Σ λ_j n_j over the active rows.
        var normals = Matrix<double>.Build.Dense(n, active.Count);
        for (int c = 0; c < active.Count; c++)
        {
            var (cols, vals) = rows.Row(active[c]);
            for (int k = 0; k < cols.Length; k++)
            {
                normals[cols.Span[k], c] = vals.Span[k];
            }
        }

        var g = Vector<double>.Build.DenseOfArray(gradient);
        // Multipliers: nonnegative least squares over the inequalities (a degenerate active set has many
        // multiplier vectors; KKT asks only that one of them be nonnegative).
        var lambda = active.Count == 0 ? Vector<double>.Build.Dense(0) : NonNegativeLeastSquares(normals, g, active.Select(j => j >= equalities).ToArray());
        var residual = active.Count == 0 ? g : g - (normals * lambda);
        Assert.True(residual.InfinityNorm() <= tolerance * gradientScale, $"{what}: stationarity residual {residual.InfinityNorm():g3} (gradient scale {gradientScale:g3}, {active.Count} active)");
        for (int c = 0; c < active.Count; c++)
        {
            if (active[c] >= equalities)
            {
                Assert.True(lambda[c] >= -tolerance * gradientScale, $"{what}: multiplier of active row {active[c]} is {lambda[c]:g3} < 0");
            }
        }
    }

    /// <summary>
    /// min ‖Aλ − b‖ with λ_c ≥ 0 where <paramref name="signed"/>[c] (Lawson &amp; Hanson, "Solving Least Squares
    /// Problems", 1974, algorithm NNLS, extended to free variables by keeping them in the passive set).
    /// </summary>
    private static Vector<double> NonNegativeLeastSquares(Matrix<double> a, Vector<double> b, bool[] signed)
    {
        int n = a.ColumnCount;
        var passive = Enumerable.Range(0, n).Select(c => !signed[c]).ToArray();
        var x = Vector<double>.Build.Dense(n);
        if (passive.Any(p => p))
        {
            x = SolveOn(a, b, passive);
        }

        for (int outer = 0; outer < 3 * n + 10; outer++)
        {
            var w = a.TransposeThisAndMultiply(b - (a * x));
            int best = -1;
            double bestValue = 1e-13 * Math.Max(1, b.InfinityNorm()) * Math.Max(1, a.InfinityNorm());
            for (int c = 0; c < n; c++)
            {
                if (!passive[c] && w[c] > bestValue)
                {
                    bestValue = w[c];
                    best = c;
                }
            }

            if (best < 0)
            {
                return x;
            }

            passive[best] = true;
            for (int inner = 0; inner < 3 * n + 10; inner++)
            {
                var z = SolveOn(a, b, passive);
                double alpha = 1;
                int leaving = -1;
                for (int c = 0; c < n; c++)
                {
                    if (passive[c] && signed[c] && z[c] <= 0)
                    {
                        double ratio = x[c] / (x[c] - z[c]);
                        if (ratio < alpha)
                        {
                            alpha = ratio;
                            leaving = c;
                        }
                    }
                }

                if (leaving < 0)
                {
                    x = z;
                    break;
                }

                x += alpha * (z - x);
                for (int c = 0; c < n; c++)
                {
                    if (passive[c] && signed[c] && x[c] <= 1e-15)
                    {
                        passive[c] = false;
                        x[c] = 0;
                    }
                }
            }
        }

        return x;
    }

    private static Vector<double> SolveOn(Matrix<double> a, Vector<double> b, bool[] passive)
    {
        var columns = Enumerable.Range(0, a.ColumnCount).Where(c => passive[c]).ToArray();
        var result = Vector<double>.Build.Dense(a.ColumnCount);
        if (columns.Length == 0)
        {
            return result;
        }

        var sub = Matrix<double>.Build.Dense(a.RowCount, columns.Length, (i, k) => a[i, columns[k]]);
        var svd = sub.Svd(true);
        double cut = 1e-12 * (svd.S.Count > 0 ? svd.S[0] : 0);
        var y = Vector<double>.Build.Dense(columns.Length);
        for (int k = 0; k < svd.S.Count; k++)
        {
            if (svd.S[k] > cut)
            {
                y += svd.VT.Row(k) * (svd.U.Column(k) * b / svd.S[k]);
            }
        }

        for (int k = 0; k < columns.Length; k++)
        {
            result[columns[k]] = y[k];
        }

        return result;
    }

    /// <summary>KKT of a limited plan: gradient of J/2 by the adjoint recursion plus the slack terms.</summary>
    /// <param name="relaxedFirstRateInputs">Inputs whose k = 0 rate limits the checked problem leaves out (none when null).</param>
    internal static void CheckPlan(CompiledModel model, PlanRequest request, Plan plan, double? linearWeight, double[] slack, double tolerance = 1e-8, IReadOnlyCollection<int>? relaxedFirstRateInputs = null)
    {
        var problem = request.PreviousInput is null ? model.ConstrainedWithoutPrevious! : model.ConstrainedWithPrevious!;
        int nm = model.DecisionVariables;
        var x = new double[nm + problem.SoftLimits.Count];
        plan.Inputs.CopyTo(x, 0);
        for (int s = 0; s < problem.SoftLimits.Count; s++)
        {
            x[nm + s] = slack[s];
        }

        var gradient = new double[x.Length];
        model.Trajectory.Gradient(plan.Inputs, plan.States, plan.Outputs, plan.Horizon, request.Reference, plan.Target?.State, plan.Target?.Input, request.PreviousInput, gradient.AsSpan(0, nm));
        double rho = linearWeight ?? problem.SoftLimits.AutomaticLinearWeight;
        for (int s = 0; s < problem.SoftLimits.Count; s++)
        {
            gradient[nm + s] = (rho / 2) + (problem.SoftLimits.Weights[s] * slack[s]);
        }

        var rhs = new double[problem.RowCount];
        problem.Rows.RightHandSides(request.State, request.PreviousInput, [], rhs);

        // The relaxed problem is built here, from what each row stands for, not by the code under test.
        for (int row = 0; row < rhs.Length; row++)
        {
            var what = problem.Rows.Meaning(row);
            if (what.Step == 0 && what.Kind is LimitKind.InputRateMin or LimitKind.InputRateMax && relaxedFirstRateInputs?.Contains(what.Index) == true)
            {
                rhs[row] = double.NegativeInfinity;
            }
        }

        Check(gradient, problem.Solver.Constraints, rhs, 0, x, tolerance, plan.Status.ToString());
    }
}
