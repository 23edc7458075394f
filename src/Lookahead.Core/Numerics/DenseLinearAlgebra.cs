namespace Lookahead.Core.Numerics;

/// <summary>
/// The few dense kernels that compiling a model spends its time in — matrix product, Cholesky factorisation,
/// triangular solves and products, symmetric eigenvalues — on column-major arrays: entry (i, j) of a matrix with
/// leading dimension ld is at i + j·ld of the span handed in, which starts at the matrix's (0, 0) entry, so a span
/// sliced at the right offset passes any sub-matrix. Two implementations give the same results to rounding:
/// <see cref="Native"/> calls the system's OpenBLAS (present when Debian's <c>libopenblas0</c> is installed), and
/// <see cref="Managed"/> is blocked C# that needs nothing. Both run on the calling thread only: requests are
/// compiled in parallel already, so a kernel must not start threads of its own.
/// </summary>
internal abstract class DenseLinearAlgebra
{
    /// <summary>OpenBLAS through <c>libopenblas.so.0</c>, or null when the library is not installed.</summary>
    public static DenseLinearAlgebra? Native { get; } = NativeDenseLinearAlgebra.TryLoad();

    /// <summary>The C# implementation, always available.</summary>
    public static DenseLinearAlgebra Managed { get; } = new ManagedDenseLinearAlgebra();

    /// <summary>What compiling uses: <see cref="Native"/> when present, else <see cref="Managed"/>.</summary>
    public static DenseLinearAlgebra Default { get; } = Native ?? Managed;

    /// <summary>A short name for logs and benchmark output.</summary>
    public abstract string Name { get; }

    /// <summary>
    /// C ← α·op(A)·op(B) + β·C with C rows×columns, op(A) rows×inner, op(B) inner×columns, op(X) = Xᵀ when the
    /// flag is set. With β = 0, C is not read (so it may hold anything, NaN included).
    /// </summary>
    /// <exception cref="ArgumentException">A span is too short for its shape and leading dimension.</exception>
    public void Multiply(
        bool transposeA, bool transposeB, int rows, int columns, int inner, double alpha,
        ReadOnlySpan<double> a, int lda, ReadOnlySpan<double> b, int ldb, double beta, Span<double> c, int ldc)
    {
        CheckShape(transposeA ? inner : rows, transposeA ? rows : inner, a.Length, lda, nameof(a));
        CheckShape(transposeB ? columns : inner, transposeB ? inner : columns, b.Length, ldb, nameof(b));
        CheckShape(rows, columns, c.Length, ldc, nameof(c));
        if (rows == 0 || columns == 0)
        {
            return;
        }

        MultiplyCore(transposeA, transposeB, rows, columns, inner, alpha, a, lda, b, ldb, beta, c, ldc);
    }

    /// <summary>
    /// Factors the symmetric positive definite A (n×n, only its lower triangle read) as A = LLᵀ in place: the lower
    /// triangle, diagonal included, becomes L; the strict upper triangle is neither read nor written.
    /// </summary>
    /// <returns>False when A is not numerically positive definite (a pivot is not positive); A is then partly overwritten.</returns>
    public bool CholeskyLower(Span<double> a, int n, int lda)
    {
        CheckShape(n, n, a.Length, lda, nameof(a));
        return n == 0 || CholeskyLowerCore(a, n, lda);
    }

    /// <summary>B ← op(L)⁻¹·B for the lower-triangular L (n×n, lower triangle read) and B n×columns.</summary>
    public void SolveLower(bool transpose, int n, int columns, ReadOnlySpan<double> l, int ldl, Span<double> b, int ldb)
    {
        CheckShape(n, n, l.Length, ldl, nameof(l));
        CheckShape(n, columns, b.Length, ldb, nameof(b));
        if (n == 0 || columns == 0)
        {
            return;
        }

        SolveLowerCore(transpose, n, columns, l, ldl, b, ldb);
    }

    /// <summary>x ← op(L)·x for the lower-triangular L (n×n, lower triangle read) and x of length n.</summary>
    public void MultiplyLowerVector(bool transpose, int n, ReadOnlySpan<double> l, int ldl, Span<double> x)
    {
        CheckShape(n, n, l.Length, ldl, nameof(l));
        CheckShape(n, 1, x.Length, Math.Max(1, n), nameof(x));
        if (n > 0)
        {
            MultiplyLowerVectorCore(transpose, n, l, ldl, x);
        }
    }

    /// <summary>x ← op(L)⁻¹·x for the lower-triangular L (n×n, lower triangle read) and x of length n.</summary>
    public void SolveLowerVector(bool transpose, int n, ReadOnlySpan<double> l, int ldl, Span<double> x)
    {
        CheckShape(n, n, l.Length, ldl, nameof(l));
        CheckShape(n, 1, x.Length, Math.Max(1, n), nameof(x));
        if (n > 0)
        {
            SolveLowerVectorCore(transpose, n, l, ldl, x);
        }
    }

    /// <summary>
    /// The eigenvalues of the symmetric A (n×n, lower triangle read), in no promised order. A is destroyed.
    /// </summary>
    /// <exception cref="NumericScaleException">The eigenvalue iteration did not converge.</exception>
    public double[] SymmetricEigenvalues(Span<double> a, int n, int lda)
    {
        CheckShape(n, n, a.Length, lda, nameof(a));
        return n == 0 ? [] : SymmetricEigenvaluesCore(a, n, lda);
    }

    protected abstract void MultiplyCore(
        bool transposeA, bool transposeB, int rows, int columns, int inner, double alpha,
        ReadOnlySpan<double> a, int lda, ReadOnlySpan<double> b, int ldb, double beta, Span<double> c, int ldc);

    protected abstract bool CholeskyLowerCore(Span<double> a, int n, int lda);

    protected abstract void SolveLowerCore(bool transpose, int n, int columns, ReadOnlySpan<double> l, int ldl, Span<double> b, int ldb);

    protected abstract void MultiplyLowerVectorCore(bool transpose, int n, ReadOnlySpan<double> l, int ldl, Span<double> x);

    protected abstract void SolveLowerVectorCore(bool transpose, int n, ReadOnlySpan<double> l, int ldl, Span<double> x);

    protected abstract double[] SymmetricEigenvaluesCore(Span<double> a, int n, int lda);

    /// <summary>C ← β·C over a rows×columns matrix; β = 0 clears C without reading it (NaN included).</summary>
    protected static void ScaleColumns(int rows, int columns, double beta, Span<double> c, int ldc)
    {
        if (beta == 1)
        {
            return;
        }

        for (int j = 0; j < columns; j++)
        {
            var column = c.Slice(j * ldc, rows);
            if (beta == 0)
            {
                column.Clear();
            }
            else
            {
                foreach (ref double v in column)
                {
                    v *= beta;
                }
            }
        }
    }

    /// <summary>A rows×columns matrix with leading dimension ld needs ld·(columns − 1) + rows entries, and ld ≥ max(1, rows).</summary>
    private static void CheckShape(int rows, int columns, int length, int ld, string name)
    {
        if (rows < 0 || columns < 0)
        {
            throw new ArgumentException($"{name}: negative dimension {rows}×{columns}", name);
        }

        if (ld < Math.Max(1, rows))
        {
            throw new ArgumentException($"{name}: leading dimension {ld} is below its {rows} rows", name);
        }

        long needed = rows == 0 || columns == 0 ? 0 : ((long)ld * (columns - 1)) + rows;
        if (length < needed)
        {
            throw new ArgumentException($"{name}: {length} entries hold no {rows}×{columns} matrix with leading dimension {ld}", name);
        }
    }
}
