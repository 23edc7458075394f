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
    {
        if (matrix.RowCount != matrix.ColumnCount)
        {
            throw new ArgumentException("the matrix must be square", nameof(matrix));
        }

        var factor = matrix.Cholesky().Factor;
        Size = matrix.RowCount;
        lower = new double[Size * Size];
        for (int i = 0; i < Size; i++)
        {
            for (int j = 0; j <= i; j++)
            {
                lower[(i * Size) + j] = factor[i, j];
            }
        }
    }

    public int Size { get; }

    /// <summary>L, row-major (upper triangle zero). Read-only view.</summary>
    public ReadOnlySpan<double> Lower => lower;

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
