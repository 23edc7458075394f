using MathNet.Numerics.LinearAlgebra;
using MathNet.Numerics.LinearAlgebra.Storage;

namespace Lookahead.Core.Numerics;

/// <summary>
/// H = LLᵀ as a read-only MathNet matrix that holds no entries of its own: each entry is computed from the
/// factor when read (H_ij = Σ_{k ≤ min(i,j)} L_ik L_jk, one dot product of O(n)), and products with a vector go
/// through the factor in O(n²) as for a dense matrix. It stands in for a condensed Hessian whose factor is kept
/// anyway, so the Hessian costs no memory of its own; reading every entry one by one costs O(n³), so a caller
/// that needs many of them should work with the factor instead. Entries agree with the matrix that was factored
/// to its rounding.
/// </summary>
internal sealed class FactoredSymmetricMatrix : MathNet.Numerics.LinearAlgebra.Double.Matrix
{
    private readonly CholeskyFactor factor;

    public FactoredSymmetricMatrix(CholeskyFactor factor)
        : base(new FactoredStorage(factor))
    {
        this.factor = factor;
    }

    /// <summary>y = L(Lᵀx).</summary>
    protected override void DoMultiply(Vector<double> rightSide, Vector<double> result)
    {
        int n = factor.Size;
        var lower = factor.Lower;
        var x = rightSide.ToArray();
        var t = new double[n];

        // t = Lᵀx: row i of L, scaled by x_i, adds into t[0..i].
        for (int i = 0; i < n; i++)
        {
            if (x[i] != 0)
            {
                DenseKernels.Axpy(x[i], lower.Slice(i * n, i + 1), t.AsSpan(0, i + 1));
            }
        }

        for (int i = 0; i < n; i++)
        {
            result[i] = DenseKernels.Dot(lower.Slice(i * n, i + 1), t.AsSpan(0, i + 1));
        }
    }

    /// <summary>Hᵀx = Hx: H is symmetric.</summary>
    protected override void DoTransposeThisAndMultiply(Vector<double> rightSide, Vector<double> result) => DoMultiply(rightSide, result);

    private sealed class FactoredStorage : MatrixStorage<double>
    {
        private readonly CholeskyFactor factor;

        public FactoredStorage(CholeskyFactor factor)
            : base(factor.Size, factor.Size)
        {
            this.factor = factor;
        }

        public override bool IsDense => true;

        public override bool IsFullyMutable => false;

        public override bool IsMutableAt(int row, int column) => false;

        public override double At(int row, int column)
        {
            int n = factor.Size;
            int shared = Math.Min(row, column) + 1;
            return DenseKernels.Dot(factor.Lower.Slice(row * n, shared), factor.Lower.Slice(column * n, shared));
        }

        public override void At(int row, int column, double value) =>
            throw new NotSupportedException("the Hessian is read-only: it is represented by its Cholesky factor");
    }
}
