using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// Coordinates in which every stage of the limited steady-state target is a strictly convex program over the
/// inputs alone, built once per model.
/// <para>
/// Equilibria are z = [x; u] = N w with N an orthonormal basis of the null space of [A − I, B]. Split w along the SVD
/// of its input block N_u = U Σ Vᵀ: w = V_d Σ_d⁻¹ v + W_f b, so that u = U_d v with U_d orthonormal (‖u‖ = ‖v‖) and
/// b moves only states that need no input (integrating modes). b meets no limit, so stage 1 minimises it out
/// exactly: with E = Q^{1/2} C N_x, E_a = E V_d Σ_d⁻¹, E_f = E W_f and P_c the projector onto range(E_f)^⊥,
/// min_b ‖E_a v + E_f b − Q^{1/2} r‖² = ‖F v − P_c Q^{1/2} r‖², F = P_c E_a, attained with least ‖b‖ at
/// b = E_f⁺(Q^{1/2} r − E_a v) — which is also what stage 3 (least ‖x‖ once u is fixed) asks for, because
/// ‖x‖² = ‖w‖² − ‖u‖² and ‖w‖² = ‖Σ_d⁻¹ v‖² + ‖b‖².
/// </para>
/// <para>
/// Finally v = V_F [s; c] along the SVD F = U_s S_s V_sᵀ (rank ρ): the output error depends on s only, strictly
/// convexly (½‖S_s s − U_sᵀ P_c Q^{1/2} r‖² + constant), and c spans the inputs that leave the weighted output
/// unchanged. Hence u = T [s; c] with T = U_d V_F (orthonormal columns), and x = X_v [s; c] + X_r r.
/// </para>
/// Rank decisions follow <see cref="TargetMap"/>: relative to the data's scale, never to a block's own largest
/// singular value.
/// </summary>
internal sealed class TargetCoordinates
{
    private TargetCoordinates(int inputs, int dimension, double[] curvature, double[] inputRows, double[] linearMap, double[] unconstrainedMap, double[] stateFromCoordinates, double[] stateFromReference)
    {
        Inputs = inputs;
        Dimension = dimension;
        Curvature = curvature;
        InputRows = inputRows;
        LinearMap = linearMap;
        UnconstrainedMap = unconstrainedMap;
        StateFromCoordinates = stateFromCoordinates;
        StateFromReference = stateFromReference;
    }

    /// <summary>m.</summary>
    public int Inputs { get; }

    /// <summary>d = dim of the inputs that can be held at an equilibrium; 0 when only u = 0 can.</summary>
    public int Dimension { get; }

    /// <summary>ρ = rank F, the number of s coordinates; the remaining d − ρ are c.</summary>
    public int OutputRank => Curvature.Length;

    /// <summary>S_s (ρ): stage 1 is ½Σ_i (S_i s_i − ĝ_i)² with ĝ = U_sᵀ P_c Q^{1/2} r.</summary>
    public double[] Curvature { get; }

    /// <summary>T, m×d row-major: u = T [s; c].</summary>
    public double[] InputRows { get; }

    /// <summary>ρ×p row-major: diag(S_s) U_sᵀ P_c Q^{1/2}, so stage 1's linear term is −LinearMap·r.</summary>
    public double[] LinearMap { get; }

    /// <summary>ρ×p row-major: diag(S_s)⁻¹ U_sᵀ P_c Q^{1/2}, stage 1's minimiser when no limit is met.</summary>
    public double[] UnconstrainedMap { get; }

    /// <summary>X_v, n×d row-major.</summary>
    public double[] StateFromCoordinates { get; }

    /// <summary>X_r, n×p row-major.</summary>
    public double[] StateFromReference { get; }

    public static TargetCoordinates Build(Matrix<double> a, Matrix<double> b, Matrix<double> c, Matrix<double> q)
    {
        int n = a.RowCount;
        int m = b.ColumnCount;
        int p = c.RowCount;
        var build = Matrix<double>.Build;

        var nullM = TargetMap.EquilibriumBasis(a, b);
        int k = nullM.ColumnCount;
        if (k == 0)
        {
            return Empty(n, m, p);
        }

        var nx = nullM.SubMatrix(0, n, 0, k);
        var nu = nullM.SubMatrix(n, m, 0, k);
        var qHalf = TargetMap.SymmetricSquareRoot(q);
        var e = qHalf * c * nx;
        double scale = qHalf.FrobeniusNorm() * Math.Max(1.0, c.FrobeniusNorm());

        // N_u has orthonormal-column parent N, so its singular values are at most 1: the scale is 1 (as in TargetMap).
        var inputSvd = nu.Svd(computeVectors: true);
        int d = Rank(inputSvd.S, 1.0, m, k);
        if (d == 0)
        {
            return Empty(n, m, p);
        }

        var ud = inputSvd.U.SubMatrix(0, m, 0, d);
        var sigma = inputSvd.S.SubVector(0, d);
        var vt = inputSvd.VT;
        var vd = vt.SubMatrix(0, d, 0, k).Transpose();
        var wf = vt.SubMatrix(d, k - d, 0, k).Transpose();
        var vdScaled = vd * build.DenseOfDiagonalVector(sigma.Map(s => 1.0 / s));
        var ea = e * vdScaled;

        // Integrating modes: b = E_f⁺(Q^{1/2} r − E_a v); P_c = I − E_f E_f⁺.
        var efPinv = build.Dense(k - d, p);
        var pc = build.DenseIdentity(p);
        if (k > d)
        {
            var ef = e * wf;
            efPinv = TargetMap.PseudoInverse(ef, scale);
            pc -= ef * efPinv;
        }

        // F = P_c E_a. Its rank is decided before the Σ_d⁻¹ scaling (on P_c E V_d, whose columns are as well scaled
        // as E's), as TargetMap decides on E: Σ_d⁻¹ only stretches the columns, so the rank is the same, and the rule
        // stays relative to the data's scale. The basis comes from F itself: its leading ρ right singular vectors span its
        // row space.
        var f = pc * ea;
        int rho = Rank((pc * e * vd).Svd(computeVectors: false).S, scale, p, d);
        var outputSvd = f.Svd(computeVectors: true);
        var us = outputSvd.U.SubMatrix(0, p, 0, rho);
        var ss = outputSvd.S.SubVector(0, rho);
        var vf = outputSvd.VT.Transpose();

        var reduced = us.TransposeThisAndMultiply(pc * qHalf);
        var linear = build.DenseOfDiagonalVector(ss) * reduced;
        var unconstrained = build.DenseOfDiagonalVector(ss.Map(s => 1.0 / s)) * reduced;
        var inputRows = ud * vf;
        var stateFromCoordinates = nx * (vdScaled - (wf * efPinv * ea)) * vf;
        var stateFromReference = nx * wf * efPinv * qHalf;

        return new TargetCoordinates(
            m,
            d,
            ss.ToArray(),
            DenseMatrix.RowMajor(inputRows),
            DenseMatrix.RowMajor(linear),
            DenseMatrix.RowMajor(unconstrained),
            DenseMatrix.RowMajor(stateFromCoordinates),
            DenseMatrix.RowMajor(stateFromReference));
    }

    private static TargetCoordinates Empty(int n, int m, int p) =>
        new(m, 0, [], [], [], [], [], new double[n * p]);

    /// <summary>How many singular values exceed TargetMap's threshold tol·scale·max(rows, columns).</summary>
    private static int Rank(Vector<double> singularValues, double scale, int rows, int columns)
    {
        double threshold = TargetMap.Tolerance * scale * Math.Max(rows, columns);
        return singularValues.Count(s => s > threshold);
    }
}
