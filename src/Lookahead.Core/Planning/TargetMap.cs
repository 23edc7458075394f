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

    private TargetMap(double[] stateMap, double[] inputMap)
    {
        StateMap = stateMap;
        InputMap = inputMap;
    }

    /// <summary>n×p row-major: x_s = StateMap·r.</summary>
    public double[] StateMap { get; }

    /// <summary>m×p row-major: u_s = InputMap·r.</summary>
    public double[] InputMap { get; }

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

    public static TargetMap Build(Matrix<double> a, Matrix<double> b, Matrix<double> c, Matrix<double> q)
    {
        int n = a.RowCount;
        int m = b.ColumnCount;
        int p = c.RowCount;
        var build = Matrix<double>.Build;

        var nullM = EquilibriumBasis(a, b);
        if (nullM.ColumnCount == 0)
        {
            return new TargetMap(new double[n * p], new double[m * p]);
        }

        var qHalf = SymmetricSquareRoot(q);
        var cz = build.Dense(p, n + m);
        cz.SetSubMatrix(0, 0, c);
        var e = qHalf * cz * nullM;

        // Stage 1: w = pinv(E)·Q^{1/2}·r + N_E t.
        // Rank decisions are relative to the data's scale, not to E's own largest singular value, so a
        // block that is zero up to rounding is treated as zero rather than inverted.
        double scale = qHalf.FrobeniusNorm() * Math.Max(1.0, c.FrobeniusNorm());
        var z0 = nullM * PseudoInverse(e, scale) * qHalf;
        var basis = nullM * NullSpace(e, scale);

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

        return new TargetMap(DenseMatrix.RowMajor(z0.SubMatrix(0, n, 0, p)), DenseMatrix.RowMajor(z0.SubMatrix(n, m, 0, p)));
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
