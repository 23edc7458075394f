using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Numerics;

/// <summary>
/// H = LLᵀ for a symmetric positive definite H, kept as a private row-major copy of L that is never
/// modified after construction, so one instance can serve any number of threads. The factorisation
/// itself is MathNet's; the solves work on caller-provided spans and allocate nothing.
/// </summary>
public sealed class CholeskyFactor
{
    private readonly double[] lower;

    /// <summary>Factors <paramref name="matrix"/>.</summary>
    /// <exception cref="ArgumentException">The matrix is not square or not positive definite.</exception>
    public CholeskyFactor(Matrix<double> matrix)
        : this(SquareCholesky(matrix))
    {
    }

    /// <summary>Keeps a copy of an existing MathNet factorisation's L (no second factorisation).</summary>
    public CholeskyFactor(MathNet.Numerics.LinearAlgebra.Factorization.Cholesky<double> cholesky)
    {
        var factor = cholesky.Factor;
        Size = factor.RowCount;
        lower = new double[Size * Size];
        for (int i = 0; i < Size; i++)
        {
            for (int j = 0; j <= i; j++)
            {
                lower[(i * Size) + j] = factor[i, j];
            }
        }
    }

    private static MathNet.Numerics.LinearAlgebra.Factorization.Cholesky<double> SquareCholesky(Matrix<double> matrix) =>
        matrix.RowCount == matrix.ColumnCount ? matrix.Cholesky() : throw new ArgumentException("the matrix must be square", nameof(matrix));

    private CholeskyFactor(double[] lower, int size)
    {
        this.lower = lower;
        Size = size;
    }

    public int Size { get; }

    /// <summary>The factor of blkdiag(H, diag(d)) built from H's factor, without refactoring H.</summary>
    /// <exception cref="ArgumentException">An entry of <paramref name="diagonal"/> is not positive.</exception>
    public CholeskyFactor WithDiagonalBlock(ReadOnlySpan<double> diagonal)
    {
        int n = Size + diagonal.Length;
        var combined = new double[n * n];
        for (int i = 0; i < Size; i++)
        {
            lower.AsSpan(i * Size, i + 1).CopyTo(combined.AsSpan(i * n, i + 1));
        }

        for (int k = 0; k < diagonal.Length; k++)
        {
            if (!(diagonal[k] > 0))
            {
                throw new ArgumentException("diagonal entries must be positive", nameof(diagonal));
            }

            int i = Size + k;
            combined[(i * n) + i] = Math.Sqrt(diagonal[k]);
        }

        return new CholeskyFactor(combined, n);
    }

    /// <summary>L, row-major (upper triangle zero). Read-only view.</summary>
    public ReadOnlySpan<double> Lower => lower;

    /// <summary>(Lᵀ)⁻¹ = (L⁻¹)ᵀ, column-major: column c of the result is row c of L⁻¹. One triangular solve against I, n³/3 flops.</summary>
    public double[] InverseTransposeColumnMajor()
    {
        // L⁻ᵀ column-major is the solve Lᵀ X = I, done by the dense kernels (blocked, or OpenBLAS): a scalar triangular
        // inverse was the bulk of compiling a limited model with thousands of variables, bound by cache misses.
        int n = Size;
        var columnMajorLower = new double[n * n];
        for (int i = 0; i < n; i++)
        {
            for (int j = 0; j <= i; j++)
            {
                columnMajorLower[(j * n) + i] = lower[(i * n) + j];
            }
        }

        var result = new double[n * n];
        for (int c = 0; c < n; c++)
        {
            result[(c * n) + c] = 1.0;
        }

        DenseLinearAlgebra.Default.SolveLower(transpose: true, n, n, columnMajorLower, n, result, n);
        return result;
    }

    /// <summary>Solves L y = b in place (y overwrites b).</summary>
    public void SolveLower(Span<double> b)
    {
        CheckLength(b.Length);
        int n = Size;
        for (int i = 0; i < n; i++)
        {
            var row = lower.AsSpan(i * n, i);
            double sum = b[i] - DenseKernels.Dot(row, b[..i]);
            b[i] = sum / lower[(i * n) + i];
        }
    }

    /// <summary>Solves Lᵀ x = y in place (x overwrites y).</summary>
    public void SolveUpper(Span<double> y)
    {
        CheckLength(y.Length);
        int n = Size;
        for (int i = n - 1; i >= 0; i--)
        {
            y[i] /= lower[(i * n) + i];
            double xi = y[i];
            // Column i of Lᵀ above the diagonal is row i of L: subtract its contribution from earlier rows.
            var row = lower.AsSpan(i * n, i);
            for (int j = 0; j < i; j++)
            {
                y[j] -= row[j] * xi;
            }
        }
    }

    /// <summary>Solves H x = b in place (x overwrites b).</summary>
    public void Solve(Span<double> b)
    {
        SolveLower(b);
        SolveUpper(b);
    }

    private void CheckLength(int length)
    {
        if (length != Size)
        {
            throw new ArgumentException($"vector has {length} entries; expected {Size}");
        }
    }
}
