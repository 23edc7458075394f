using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Tests.Support;

/// <summary>
/// The condensed program built the textbook way, from the prediction matrix Γ, for small sizes: every term of
/// <code>
/// J = Σ_{k=0}^{N−1} [(y_k − r)ᵀQ(y_k − r) + (u_k − u_s)ᵀR(u_k − u_s) + Δu_kᵀSΔu_k] + (x_N − x_s)ᵀP(x_N − x_s)
/// </code>
/// is a residual G·w, linear in w = [U; z] with z = [x_0; r; x_s; u_s; u_{−1}], weighted by its matrix; then
/// J = wᵀ(GᵀWG)w and the blocks of GᵀWG are H (U–U), F (U–z) and M₀ (z–z), so J = UᵀHU + 2UᵀFz + zᵀM₀z.
/// The predictions x_k = A^k x_0 + Σ_{j&lt;k} A^{k−1−j}B u_j are written out power by power; nothing is shared
/// with the compiler's cost-to-go recursion. The Δu_0 term is present only with a previous input.
/// </summary>
public static class DenseCondensedReference
{
    public sealed record Result(Matrix<double> Hessian, Matrix<double> Maps, Matrix<double> FreeCost);

    public static Result Build(Matrix<double> a, Matrix<double> b, Matrix<double> c, Matrix<double> q, Matrix<double> r, Matrix<double> s, Matrix<double> p, int horizon, bool withPreviousInput)
    {
        var build = Matrix<double>.Build;
        int n = a.RowCount, m = b.ColumnCount, outputs = c.RowCount, nm = horizon * m;
        int size = (2 * n) + outputs + (2 * m);
        int x0 = 0, rr = n, xs = n + outputs, us = (2 * n) + outputs, up = us + m;
        var residuals = new List<(Matrix<double> Rows, Matrix<double> Weight)>();

        // x_k as a map of w: [Γ_k | A^k 0 0 0 0].
        Matrix<double> State(int k)
        {
            var map = build.Dense(n, nm + size);
            var power = build.DenseIdentity(n);
            for (int i = 0; i < k; i++)
            {
                power = a * power;
            }

            map.SetSubMatrix(0, nm + x0, power);
            for (int j = 0; j < k; j++)
            {
                var influence = b;
                for (int i = 0; i < k - 1 - j; i++)
                {
                    influence = a * influence;
                }

                map.SetSubMatrix(0, j * m, influence);
            }

            return map;
        }

        Matrix<double> Selector(int rows, int column) => build.Dense(rows, nm + size, (i, j) => j == column + i ? 1.0 : 0.0);

        for (int k = 0; k < horizon; k++)
        {
            residuals.Add(((c * State(k)) - Selector(outputs, nm + rr), q));
            residuals.Add((Selector(m, k * m) - Selector(m, nm + us), r));
            if (k >= 1)
            {
                residuals.Add((Selector(m, k * m) - Selector(m, (k - 1) * m), s));
            }
            else if (withPreviousInput)
            {
                residuals.Add((Selector(m, 0) - Selector(m, nm + up), s));
            }
        }

        residuals.Add((State(horizon) - Selector(n, nm + xs), p));

        // One product GᵀWG over all residuals stacked (W block-diagonal).
        int height = residuals.Sum(t => t.Rows.RowCount);
        var stacked = build.Dense(height, nm + size);
        var weighted = build.Dense(height, nm + size);
        int at = 0;
        foreach (var (rows, weight) in residuals)
        {
            stacked.SetSubMatrix(at, 0, rows);
            weighted.SetSubMatrix(at, 0, weight * rows);
            at += rows.RowCount;
        }

        var total = stacked.TransposeThisAndMultiply(weighted);
        return new Result(total.SubMatrix(0, nm, 0, nm), total.SubMatrix(0, nm, nm, size), total.SubMatrix(nm, size, nm, size));
    }

    /// <summary>A random symmetric positive definite k×k matrix: MᵀM/k + shift·I.</summary>
    public static Matrix<double> RandomSpd(Random random, int k, double shift)
    {
        var m = Matrix<double>.Build.Dense(k, k, (_, _) => (random.NextDouble() * 2) - 1);
        return (m.TransposeThisAndMultiply(m) / k) + (Matrix<double>.Build.DenseIdentity(k) * shift);
    }
}
