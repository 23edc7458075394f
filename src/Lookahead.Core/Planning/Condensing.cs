using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// Builds the condensed quadratic program without forming the prediction matrix Γ (which would be nN×Nm).
/// With V_{N−1} = P, V_l = CᵀQC + AᵀV_{l+1}A and Z_l = V_l B, the blocks are
/// H_{jl} = (A^{l−j}B)ᵀ Z_l (j ≤ l) and the state-gradient blocks are Z_jᵀ A^{j+1}.
/// </summary>
internal static class Condensing
{
    /// <summary>
    /// The Hessian and the gradient maps f = Fx·x_0 + Fr·r + Fxs·x_s + Fus·u_s + Fup·u_{−1} (each N·m rows), so that
    /// J(U) = UᵀHU + 2fᵀU + zᵀM₀z with z the request in <see cref="RequestLayout"/> order, which is also the order
    /// of the maps above.
    /// </summary>
    /// <param name="FreeCost">M₀: J at U = 0 as a quadratic form of z (see <see cref="CostForm.Assemble"/>).</param>
    public sealed record Result(Matrix<double> Hessian, Matrix<double> Fx, Matrix<double> Fr, Matrix<double> Fxs, Matrix<double> Fus, Matrix<double> Fup, Matrix<double> FreeCost);

    public static Result Build(
        Matrix<double> a,
        Matrix<double> b,
        Matrix<double> c,
        Matrix<double> q,
        Matrix<double> r,
        Matrix<double> s,
        Matrix<double> p,
        int horizon,
        bool withPreviousInput)
    {
        int n = a.RowCount;
        int m = b.ColumnCount;
        int outputs = c.RowCount;
        int size = horizon * m;
        var qx = c.TransposeThisAndMultiply(q * c);

        // A^k B for k = 0 … N−1, and their running sums Σ_{i≤k} A^i B.
        var powers = new Matrix<double>[horizon];
        var sums = new Matrix<double>[horizon];
        powers[0] = b;
        sums[0] = b;
        for (int k = 1; k < horizon; k++)
        {
            powers[k] = a * powers[k - 1];
            sums[k] = sums[k - 1] + powers[k];
        }

        var z = new Matrix<double>[horizon];
        var v = p;
        z[horizon - 1] = p * b;
        for (int l = horizon - 2; l >= 0; l--)
        {
            v = qx + a.TransposeThisAndMultiply(v * a);
            z[l] = v * b;
        }

        // Cost-to-go of the free response from x_0: CᵀQC + AᵀV_0A.
        var freeStateWeight = qx + a.TransposeThisAndMultiply(v * a);

        var hessian = Matrix<double>.Build.Dense(size, size);
        for (int l = 0; l < horizon; l++)
        {
            for (int j = 0; j <= l; j++)
            {
                var block = powers[l - j].TransposeThisAndMultiply(z[l]);
                hessian.SetSubMatrix(j * m, l * m, block);
                if (j != l)
                {
                    hessian.SetSubMatrix(l * m, j * m, block.Transpose());
                }
            }
        }

        for (int k = 0; k < horizon; k++)
        {
            AddBlock(hessian, k, k, m, r, 1.0);

            // Δu_k = u_k − u_{k−1}: u_k appears in Δu_k (k ≥ 1, or k = 0 with a previous input) and in Δu_{k+1}.
            double diagonalCount = (k >= 1 || withPreviousInput ? 1 : 0) + (k + 1 < horizon ? 1 : 0);
            AddBlock(hessian, k, k, m, s, diagonalCount);
            if (k + 1 < horizon)
            {
                AddBlock(hessian, k, k + 1, m, s, -1.0);
                AddBlock(hessian, k + 1, k, m, s, -1.0);
            }
        }

        // Exact symmetry, so the factorisation sees the matrix that was meant.
        hessian = (hessian + hessian.Transpose()) * 0.5;

        var fx = Matrix<double>.Build.Dense(size, n);
        var fr = Matrix<double>.Build.Dense(size, outputs);
        var fxs = Matrix<double>.Build.Dense(size, n);
        var fus = Matrix<double>.Build.Dense(size, m);
        var fup = Matrix<double>.Build.Dense(size, m);
        var ctq = c.TransposeThisAndMultiply(q);
        var aPower = a;
        var aToTheN = a;
        for (int j = 0; j < horizon; j++)
        {
            if (j == horizon - 1)
            {
                aToTheN = aPower;
            }

            fx.SetSubMatrix(j * m, 0, z[j].TransposeThisAndMultiply(aPower));
            aPower = a * aPower;

            // Stage output terms i = j+1 … N−1 see u_j through A^{i−1−j}B.
            if (j <= horizon - 2)
            {
                fr.SetSubMatrix(j * m, 0, -sums[horizon - 2 - j].TransposeThisAndMultiply(ctq));
            }

            fxs.SetSubMatrix(j * m, 0, -powers[horizon - 1 - j].TransposeThisAndMultiply(p));
            fus.SetSubMatrix(j * m, 0, -r);
        }

        if (withPreviousInput)
        {
            fup.SetSubMatrix(0, 0, -s);
        }

        // Σ_{k=0}^{N−1} (CA^k)ᵀQ by Horner's rule: Y ← CᵀQ + AᵀY.
        var referenceCross = ctq.Clone();
        for (int k = 1; k < horizon; k++)
        {
            referenceCross = ctq + a.TransposeThisAndMultiply(referenceCross);
        }

        var free = CostForm.Assemble(n, m, outputs, freeStateWeight, -referenceCross, q * horizon, -aToTheN.TransposeThisAndMultiply(p), p, r * horizon, withPreviousInput ? s : null);
        return new Result(hessian, fx, fr, fxs, fus, fup, free);
    }

    private static void AddBlock(Matrix<double> target, int blockRow, int blockColumn, int m, Matrix<double> block, double scale)
    {
        if (scale == 0)
        {
            return;
        }

        for (int i = 0; i < m; i++)
        {
            for (int j = 0; j < m; j++)
            {
                target[(blockRow * m) + i, (blockColumn * m) + j] += scale * block[i, j];
            }
        }
    }
}
