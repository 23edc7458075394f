using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// The unconstrained steady-state target as a linear map of the reference: [x_s; u_s] = T r, where
/// x_s = A x_s + B u_s and, lexicographically, (1) ‖Q^{1/2}(C x_s − r)‖ is least, (2) then ‖u_s‖, (3) then ‖x_s‖.
/// Each stage restricts the previous stage's solution set to its own minimisers through null-space bases from the SVD.
/// </summary>
internal sealed class TargetMap
{
    /// <summary>Relative tolerance below which a singular value counts as zero.</summary>
    public const double Tolerance = 1e-10;

    private TargetMap(double[] stateMap, double[] inputMap, double[] disturbanceStateMap, double[] disturbanceInputMap)
    {
        StateMap = stateMap;
        InputMap = inputMap;
        DisturbanceStateMap = disturbanceStateMap;
        DisturbanceInputMap = disturbanceInputMap;
    }

    /// <summary>n×p row-major: x_s = StateMap·r.</summary>
    public double[] StateMap { get; }

    /// <summary>m×p row-major: u_s = InputMap·r.</summary>
    public double[] InputMap { get; }

    /// <summary>n×q row-major: the part of x_s a measured disturbance v̄ adds (x_s = StateMap·r + DisturbanceStateMap·v̄).</summary>
    public double[] DisturbanceStateMap { get; }

    /// <summary>m×q row-major: the part of u_s that balances v̄.</summary>
    public double[] DisturbanceInputMap { get; }

    /// <summary>An orthonormal basis N_M of the equilibria z = [x; u] with x = A x + B u: the null space of [A − I, B].</summary>
    internal static Matrix<double> EquilibriumBasis(Matrix<double> a, Matrix<double> b)
    {
        int n = a.RowCount;
        var build = Matrix<double>.Build;
        var equilibrium = build.Dense(n, n + b.ColumnCount);
        equilibrium.SetSubMatrix(0, 0, a - build.DenseIdentity(n));
        equilibrium.SetSubMatrix(0, n, b);
        return NullSpace(equilibrium, equilibrium.FrobeniusNorm());
    }

    /// <param name="e">E (n×q) of the measured disturbances; n×0 without them.</param>
    /// <remarks>
    /// With a disturbance the equilibria are x = A x + B u + E v̄: z = z_v + N_M w with z_v = −[A − I, B]⁺E v̄, the
    /// least-norm solution (exact when E v̄ can be balanced at all; a plan says when it cannot). Stage 1 then
    /// fits Q^{1/2}(C_z N_M w) to Q^{1/2}(r − C_z z_v), and stages 2 and 3 act on the whole z. Every step is linear in
    /// (r, v̄), so both maps come out of the same projections.
    /// </remarks>
    public static TargetMap Build(Matrix<double> a, Matrix<double> b, Matrix<double> c, Matrix<double> q, Matrix<double>? e = null)
    {
        int n = a.RowCount;
        int m = b.ColumnCount;
        int p = c.RowCount;
        int nq = e?.ColumnCount ?? 0;
        var build = Matrix<double>.Build;

        var equilibrium = build.Dense(n, n + m);
        equilibrium.SetSubMatrix(0, 0, a - build.DenseIdentity(n));
        equilibrium.SetSubMatrix(0, n, b);
        var nullM = NullSpace(equilibrium, equilibrium.FrobeniusNorm());

        // z_v = −[A − I, B]⁺ E v̄ (columns: one per disturbance).
        var particular = nq == 0 ? build.Dense(n + m, 0) : -(PseudoInverse(equilibrium, equilibrium.FrobeniusNorm()) * e!);
        var qHalf = SymmetricSquareRoot(q);
        var cz = build.Dense(p, n + m);
        cz.SetSubMatrix(0, 0, c);

        // z0 = [map of r | map of v̄], projected stage by stage below.
        var z0 = build.Dense(n + m, p + nq);
        z0.SetSubMatrix(0, 0, build.Dense(n + m, p));
        if (nq > 0)
        {
            z0.SetSubMatrix(0, p, particular);
        }

        if (nullM.ColumnCount > 0)
        {
            var fit = qHalf * cz * nullM;

            // Stage 1: w = pinv(E)·Q^{1/2}·(r − C_z z_v) + N_E t.
            // Rank decisions are relative to the data's scale, not to E's own largest singular value, so a
            // block that is zero up to rounding is treated as zero rather than inverted.
            double scale = qHalf.FrobeniusNorm() * Math.Max(1.0, c.FrobeniusNorm());
            var toW = nullM * PseudoInverse(fit, scale) * qHalf;
            z0.SetSubMatrix(0, 0, toW);
            if (nq > 0)
            {
                z0.SetSubMatrix(0, p, particular - (toW * cz * particular));
            }

            var basis = nullM * NullSpace(fit, scale);

            // Stage 2: least ‖u_s‖ over the remaining freedom.
            var selectInput = build.Dense(m, n + m);
            selectInput.SetSubMatrix(0, n, build.DenseIdentity(m));
            if (basis.ColumnCount > 0)
            {
                var f = selectInput * basis;
                z0 -= basis * PseudoInverse(f, 1.0) * (selectInput * z0);
                basis = basis * NullSpace(f, 1.0);
            }

            // Stage 3: least ‖z‖; basis has orthonormal columns, so the projection is explicit.
            if (basis.ColumnCount > 0)
            {
                z0 -= basis * basis.TransposeThisAndMultiply(z0);
            }
        }

        return new TargetMap(
            DenseMatrix.RowMajor(z0.SubMatrix(0, n, 0, p)),
            DenseMatrix.RowMajor(z0.SubMatrix(n, m, 0, p)),
            DenseMatrix.RowMajor(z0.SubMatrix(0, n, p, nq)),
            DenseMatrix.RowMajor(z0.SubMatrix(n, m, p, nq)));
    }

    /// <summary>Orthonormal basis of the null space; singular values ≤ tol·scale·max(rows, columns) count as zero.</summary>
    internal static Matrix<double> NullSpace(Matrix<double> m, double scale)
    {
        int columns = m.ColumnCount;
        if (m.RowCount == 0)
        {
            return Matrix<double>.Build.DenseIdentity(columns);
        }

        var svd = m.Svd(computeVectors: true);
        var s = svd.S;
        double threshold = Tolerance * scale * Math.Max(m.RowCount, columns);
        int rank = s.Count(v => v > threshold);

        var vt = svd.VT;
        return vt.SubMatrix(rank, columns - rank, 0, columns).Transpose();
    }

    /// <summary>Moore–Penrose inverse with the same rank rule as <see cref="NullSpace"/>.</summary>
    internal static Matrix<double> PseudoInverse(Matrix<double> m, double scale)
    {
        var svd = m.Svd(computeVectors: true);
        var s = svd.S;
        var result = Matrix<double>.Build.Dense(m.ColumnCount, m.RowCount);
        double threshold = Tolerance * scale * Math.Max(m.RowCount, m.ColumnCount);
        for (int k = 0; k < s.Count; k++)
        {
            if (s[k] > threshold)
            {
                result += (1.0 / s[k]) * svd.VT.Row(k).ToColumnMatrix() * svd.U.Column(k).ToRowMatrix();
            }
        }

        return result;
    }

    /// <summary>Q^{1/2} of a symmetric positive semidefinite Q (eigenvalues below zero by rounding count as zero).</summary>
    internal static Matrix<double> SymmetricSquareRoot(Matrix<double> q)
    {
        var evd = q.Evd(Symmetricity.Symmetric);
        var root = evd.EigenValues.Select(z => Math.Sqrt(Math.Max(z.Real, 0))).ToArray();
        return evd.EigenVectors * Matrix<double>.Build.DenseOfDiagonalArray(root) * evd.EigenVectors.Transpose();
    }
}
