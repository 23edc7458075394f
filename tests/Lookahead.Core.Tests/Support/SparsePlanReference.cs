using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Tests.Support;

/// <summary>
/// A reference for the unlimited plan built in the test from the raw model data only. It solves the sparse form
/// with the states as unknowns: z = [x_1 … x_N, u_0 … u_{N−1}], the dynamics x_{k+1} = A x_k + B u_k as equalities
/// and one dense KKT system [[G, Eᵀ], [E, 0]] solved by LU. There is no condensing, no gain and no refinement, so it
/// shares no code path with the compiled model and does not inherit the condition number of the condensed Hessian.
/// The cost is the model's:
/// J = Σ_{k=0}^{N−1} [(C x_k − r)ᵀQ(C x_k − r) + (u_k − u_s)ᵀR(u_k − u_s) + Δu_kᵀSΔu_k] + (x_N − x_s)ᵀP(x_N − x_s),
/// with the Δu_0 term only when the previous input is given.
/// </summary>
public static class SparsePlanReference
{
    /// <summary>Relative singular-value cut-off for the target's null spaces and pseudo-inverses.</summary>
    private const double RankTolerance = 1e-10;

    /// <param name="Inputs">u_0 … u_{N−1}, N·m values.</param>
    /// <param name="Cost">J evaluated from its definition on the solved trajectory.</param>
    public sealed record Result(double[] Inputs, double Cost);

    /// <summary>Q, R and S are diagonal (given by their diagonals); <paramref name="terminal"/> is P (n×n).</summary>
    public static Result Solve(
        double[][] a, double[][] b, double[][] c, double[] q, double[] r, double[]? s, double[][] terminal,
        int horizon, double[] state, double[]? reference, double[]? previousInput)
    {
        var build = Matrix<double>.Build;
        var am = build.DenseOfRowArrays(a);
        var bm = build.DenseOfRowArrays(b);
        var cm = build.DenseOfRowArrays(c);
        var qm = build.DenseOfDiagonalArray(q);
        var rm = build.DenseOfDiagonalArray(r);
        var pm = build.DenseOfRowArrays(terminal);
        int n = am.RowCount, m = bm.ColumnCount, p = cm.RowCount, steps = horizon;
        int unknowns = steps * (n + m);
        int X(int k) => (k - 1) * n;            // x_k, k = 1 … N
        int U(int k) => (steps * n) + (k * m);  // u_k, k = 0 … N−1

        var zeroOutput = Vector<double>.Build.Dense(p);
        var target = reference is null
            ? (State: Vector<double>.Build.Dense(n), Input: Vector<double>.Build.Dense(m))
            : Target(am, bm, cm, q, Vector<double>.Build.DenseOfArray(reference));
        var r0 = reference is null ? zeroOutput : Vector<double>.Build.DenseOfArray(reference);
        var x0 = Vector<double>.Build.DenseOfArray(state);

        // Each term is (Σ_i L_i z[offset_i…] − d)ᵀ W (Σ_i L_i z[offset_i…] − d).
        var terms = new List<(List<(int Offset, Matrix<double> L)> Parts, Vector<double> D, Matrix<double> W)>();
        terms.Add(([], r0 - (cm * x0), qm));                                   // k = 0 output: a constant
        for (int k = 1; k < steps; k++)
        {
            terms.Add(([(X(k), cm)], r0, qm));
        }

        var identityM = build.DenseIdentity(m);
        for (int k = 0; k < steps; k++)
        {
            terms.Add(([(U(k), identityM)], target.Input, rm));
        }

        if (s is not null)
        {
            var sm = build.DenseOfDiagonalArray(s);
            for (int k = 1; k < steps; k++)
            {
                terms.Add(([(U(k), identityM), (U(k - 1), -identityM)], Vector<double>.Build.Dense(m), sm));
            }

            if (previousInput is not null)
            {
                terms.Add(([(U(0), identityM)], Vector<double>.Build.DenseOfArray(previousInput), sm));
            }
        }

        terms.Add(([(X(steps), build.DenseIdentity(n))], target.State, pm));

        // KKT: G z + Eᵀλ = h, E z = e, with G = 2 Σ LᵀWL and h = 2 Σ LᵀWd.
        int equalities = steps * n;
        var kkt = build.Dense(unknowns + equalities, unknowns + equalities);
        var rhs = Vector<double>.Build.Dense(unknowns + equalities);
        foreach (var (parts, d, w) in terms)
        {
            foreach (var (oi, li) in parts)
            {
                var liw = li.TransposeThisAndMultiply(w);
                foreach (var (oj, lj) in parts)
                {
                    AddBlock(kkt, oi, oj, 2 * liw * lj);
                }

                AddToVector(rhs, oi, 2 * liw * d);
            }
        }

        for (int k = 0; k < steps; k++)
        {
            int row = unknowns + (k * n);
            AddBlock(kkt, row, X(k + 1), build.DenseIdentity(n));
            AddBlock(kkt, row, U(k), -bm);
            if (k > 0)
            {
                AddBlock(kkt, row, X(k), -am);
            }
            else
            {
                AddToVector(rhs, row, am * x0);
            }
        }

        for (int i = unknowns; i < unknowns + equalities; i++)
        {
            for (int j = 0; j < unknowns; j++)
            {
                kkt[j, i] = kkt[i, j];
            }
        }

        var z = kkt.LU().Solve(rhs).SubVector(0, unknowns);
        double cost = 0;
        foreach (var (parts, d, w) in terms)
        {
            var e = -d;
            foreach (var (offset, l) in parts)
            {
                e += l * z.SubVector(offset, l.ColumnCount);
            }

            cost += e * (w * e);
        }

        return new Result(z.SubVector(U(0), steps * m).ToArray(), cost);
    }

    /// <summary>
    /// The steady-state target by its definition: among equilibria x_s = A x_s + B u_s, least ‖Q^{1/2}(C x_s − r)‖,
    /// then least ‖u_s‖, then least ‖x_s‖ — each stage restricted to the previous stage's minimisers.
    /// </summary>
    private static (Vector<double> State, Vector<double> Input) Target(Matrix<double> a, Matrix<double> b, Matrix<double> c, double[] q, Vector<double> reference)
    {
        var build = Matrix<double>.Build;
        int n = a.RowCount, m = b.ColumnCount;
        var equilibrium = build.Dense(n, n + m);
        equilibrium.SetSubMatrix(0, 0, a - build.DenseIdentity(n));
        equilibrium.SetSubMatrix(0, n, b);
        var basis = NullSpace(equilibrium);  // orthonormal: equilibria are z = basis·v
        var qHalf = build.DenseOfDiagonalArray(q.Select(Math.Sqrt).ToArray());
        var outputOf = build.Dense(c.RowCount, n + m);
        outputOf.SetSubMatrix(0, 0, c);
        var inputOf = build.Dense(m, n + m);
        inputOf.SetSubMatrix(0, n, build.DenseIdentity(m));

        var e = qHalf * outputOf * basis;
        var v = PseudoInverse(e) * (qHalf * reference);
        var free = NullSpace(e);
        if (free.ColumnCount > 0)
        {
            var f = inputOf * basis * free;
            v -= free * (PseudoInverse(f) * (inputOf * basis * v));
            free *= NullSpace(f);
            if (free.ColumnCount > 0)
            {
                v -= free * free.TransposeThisAndMultiply(v);  // least ‖basis·v‖ = ‖v‖ over what is left
            }
        }

        var z = basis * v;
        return (z.SubVector(0, n), z.SubVector(n, m));
    }

    private static Matrix<double> NullSpace(Matrix<double> matrix)
    {
        var svd = matrix.Svd(computeVectors: true);
        double cut = RankTolerance * Math.Max(1.0, svd.S.Count > 0 ? svd.S[0] : 0);
        int rank = svd.S.Count(v => v > cut);
        return svd.VT.SubMatrix(rank, matrix.ColumnCount - rank, 0, matrix.ColumnCount).Transpose();
    }

    private static Matrix<double> PseudoInverse(Matrix<double> matrix)
    {
        var result = Matrix<double>.Build.Dense(matrix.ColumnCount, matrix.RowCount);
        var svd = matrix.Svd(computeVectors: true);
        double cut = RankTolerance * Math.Max(1.0, svd.S.Count > 0 ? svd.S[0] : 0);
        for (int k = 0; k < svd.S.Count; k++)
        {
            if (svd.S[k] > cut)
            {
                result += svd.VT.Row(k).ToColumnMatrix() * svd.U.Column(k).ToRowMatrix() / svd.S[k];
            }
        }

        return result;
    }

    private static void AddBlock(Matrix<double> target, int row, int column, Matrix<double> block)
    {
        for (int i = 0; i < block.RowCount; i++)
        {
            for (int j = 0; j < block.ColumnCount; j++)
            {
                target[row + i, column + j] += block[i, j];
            }
        }
    }

    private static void AddToVector(Vector<double> target, int offset, Vector<double> values)
    {
        for (int i = 0; i < values.Count; i++)
        {
            target[offset + i] += values[i];
        }
    }
}
