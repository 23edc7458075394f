using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using MathNet.Numerics;
using Matrix = MathNet.Numerics.LinearAlgebra.Matrix<double>;

namespace Lookahead.Core.Numerics;

/// <summary>
/// <see cref="DenseLinearAlgebra"/> in C#, for machines without OpenBLAS. The products work on register tiles
/// (two vectors of rows by four columns, or four by two dot products) over blocks of the inner dimension that stay
/// in the first-level cache; the factorisation and the solves are blocked so that nearly all their work is such
/// products. Several times slower than OpenBLAS, far faster than entry-by-entry loops, and single-threaded.
/// </summary>
internal sealed class ManagedDenseLinearAlgebra : DenseLinearAlgebra
{
    /// <summary>Inner-dimension block: a tile's slices of A and B (6 × 256 doubles) fit in 32 KB of L1.</summary>
    private const int InnerBlock = 256;

    /// <summary>Column block of the factorisation and row block of the solves.</summary>
    private const int Block = 64;

    public override string Name => "managed";

    protected override void MultiplyCore(
        bool transposeA, bool transposeB, int rows, int columns, int inner, double alpha,
        ReadOnlySpan<double> a, int lda, ReadOnlySpan<double> b, int ldb, double beta, Span<double> c, int ldc)
    {
        ScaleColumns(rows, columns, beta, c, ldc);
        if (alpha == 0 || inner == 0)
        {
            return;
        }

        for (int l0 = 0; l0 < inner; l0 += InnerBlock)
        {
            int depth = Math.Min(InnerBlock, inner - l0);
            if (!transposeA)
            {
                // op(A) column l starts at l·lda: rows are contiguous, so tiles accumulate columns of C.
                AxpyTiles(transposeB, rows, columns, depth, alpha, a[(l0 * lda)..], lda, transposeB ? b[(l0 * ldb)..] : b[l0..], ldb, c, ldc);
            }
            else if (!transposeB)
            {
                // op(A) row i is column i of A, op(B) column j is column j of B: both contiguous, so tiles are dot products.
                DotTiles(rows, columns, depth, alpha, a[l0..], lda, b[l0..], ldb, c, ldc);
            }
            else
            {
                for (int j = 0; j < columns; j++)
                {
                    for (int i = 0; i < rows; i++)
                    {
                        double sum = 0;
                        for (int l = 0; l < depth; l++)
                        {
                            sum += a[(i * lda) + l0 + l] * b[((l0 + l) * ldb) + j];
                        }

                        c[(j * ldc) + i] += alpha * sum;
                    }
                }
            }
        }
    }

    /// <summary>
    /// C += α·A·op(B) for A rows×depth (column-major, contiguous rows), op(B) depth×columns where op(B)(l, j) is
    /// b[l + j·ldb], or b[j + l·ldb] when transposed. Tiles of 2W rows × 4 columns live in eight vector registers.
    /// </summary>
    private static void AxpyTiles(bool transposeB, int rows, int columns, int depth, double alpha, ReadOnlySpan<double> a, int lda, ReadOnlySpan<double> b, int ldb, Span<double> c, int ldc)
    {
        int width = Vector<double>.Count;
        int tileRows = Vector.IsHardwareAccelerated ? 2 * width : 0;
        int strideL = transposeB ? ldb : 1;
        int strideJ = transposeB ? 1 : ldb;
        ref double a0 = ref MemoryMarshal.GetReference(a);
        ref double b0 = ref MemoryMarshal.GetReference(b);
        int j = 0;
        for (; j + 4 <= columns; j += 4)
        {
            int i = 0;
            if (tileRows > 0)
            {
                for (; i + tileRows <= rows; i += tileRows)
                {
                    var c00 = Vector<double>.Zero;
                    var c01 = Vector<double>.Zero;
                    var c10 = Vector<double>.Zero;
                    var c11 = Vector<double>.Zero;
                    var c20 = Vector<double>.Zero;
                    var c21 = Vector<double>.Zero;
                    var c30 = Vector<double>.Zero;
                    var c31 = Vector<double>.Zero;
                    for (int l = 0; l < depth; l++)
                    {
                        nuint at = (nuint)((l * lda) + i);
                        var x0 = Vector.LoadUnsafe(ref a0, at);
                        var x1 = Vector.LoadUnsafe(ref a0, at + (nuint)width);
                        int bl = (l * strideL) + (j * strideJ);
                        var y0 = new Vector<double>(Unsafe.Add(ref b0, bl));
                        var y1 = new Vector<double>(Unsafe.Add(ref b0, bl + strideJ));
                        var y2 = new Vector<double>(Unsafe.Add(ref b0, bl + (2 * strideJ)));
                        var y3 = new Vector<double>(Unsafe.Add(ref b0, bl + (3 * strideJ)));
                        c00 = Vector.FusedMultiplyAdd(x0, y0, c00);
                        c01 = Vector.FusedMultiplyAdd(x1, y0, c01);
                        c10 = Vector.FusedMultiplyAdd(x0, y1, c10);
                        c11 = Vector.FusedMultiplyAdd(x1, y1, c11);
                        c20 = Vector.FusedMultiplyAdd(x0, y2, c20);
                        c21 = Vector.FusedMultiplyAdd(x1, y2, c21);
                        c30 = Vector.FusedMultiplyAdd(x0, y3, c30);
                        c31 = Vector.FusedMultiplyAdd(x1, y3, c31);
                    }

                    AddTile(c, (j * ldc) + i, width, alpha, c00, c01);
                    AddTile(c, ((j + 1) * ldc) + i, width, alpha, c10, c11);
                    AddTile(c, ((j + 2) * ldc) + i, width, alpha, c20, c21);
                    AddTile(c, ((j + 3) * ldc) + i, width, alpha, c30, c31);
                }
            }

            for (; i < rows; i++)
            {
                for (int jj = j; jj < j + 4; jj++)
                {
                    c[(jj * ldc) + i] += alpha * ScalarEntry(a, lda, b, strideL, strideJ, depth, i, jj);
                }
            }
        }

        // Remaining columns: one AXPY per inner index, vectorised over the rows.
        for (; j < columns; j++)
        {
            var target = c.Slice(j * ldc, rows);
            for (int l = 0; l < depth; l++)
            {
                double factor = alpha * b[(l * strideL) + (j * strideJ)];
                if (factor != 0)
                {
                    DenseKernels.Axpy(factor, a.Slice(l * lda, rows), target);
                }
            }
        }
    }

    private static double ScalarEntry(ReadOnlySpan<double> a, int lda, ReadOnlySpan<double> b, int strideL, int strideJ, int depth, int i, int j)
    {
        double sum = 0;
        for (int l = 0; l < depth; l++)
        {
            sum += a[(l * lda) + i] * b[(l * strideL) + (j * strideJ)];
        }

        return sum;
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void AddTile(Span<double> c, int offset, int width, double alpha, Vector<double> low, Vector<double> high)
    {
        var alphaV = new Vector<double>(alpha);
        var first = c.Slice(offset, width);
        var second = c.Slice(offset + width, width);
        Vector.FusedMultiplyAdd(alphaV, low, new Vector<double>(first)).CopyTo(first);
        Vector.FusedMultiplyAdd(alphaV, high, new Vector<double>(second)).CopyTo(second);
    }

    /// <summary>
    /// C += α·AᵀB with A depth×rows and B depth×columns, both column-major: C(i, j) is the dot product of columns
    /// i of A and j of B. Tiles of 4×2 dot products share their loads.
    /// </summary>
    private static void DotTiles(int rows, int columns, int depth, double alpha, ReadOnlySpan<double> a, int lda, ReadOnlySpan<double> b, int ldb, Span<double> c, int ldc)
    {
        int width = Vector<double>.Count;
        int vectorDepth = Vector.IsHardwareAccelerated ? depth - (depth % width) : 0;
        ref double a0 = ref MemoryMarshal.GetReference(a);
        ref double b0 = ref MemoryMarshal.GetReference(b);
        int i = 0;
        for (; i + 4 <= rows; i += 4)
        {
            int j = 0;
            for (; j + 2 <= columns; j += 2)
            {
                var s00 = Vector<double>.Zero;
                var s10 = Vector<double>.Zero;
                var s20 = Vector<double>.Zero;
                var s30 = Vector<double>.Zero;
                var s01 = Vector<double>.Zero;
                var s11 = Vector<double>.Zero;
                var s21 = Vector<double>.Zero;
                var s31 = Vector<double>.Zero;
                nuint ai = (nuint)(i * lda);
                nuint bj = (nuint)(j * ldb);
                nuint la = (nuint)lda;
                nuint lb = (nuint)ldb;
                for (int l = 0; l < vectorDepth; l += width)
                {
                    nuint at = ai + (nuint)l;
                    nuint bt = bj + (nuint)l;
                    var x0 = Vector.LoadUnsafe(ref a0, at);
                    var x1 = Vector.LoadUnsafe(ref a0, at + la);
                    var x2 = Vector.LoadUnsafe(ref a0, at + (2 * la));
                    var x3 = Vector.LoadUnsafe(ref a0, at + (3 * la));
                    var y0 = Vector.LoadUnsafe(ref b0, bt);
                    var y1 = Vector.LoadUnsafe(ref b0, bt + lb);
                    s00 = Vector.FusedMultiplyAdd(x0, y0, s00);
                    s10 = Vector.FusedMultiplyAdd(x1, y0, s10);
                    s20 = Vector.FusedMultiplyAdd(x2, y0, s20);
                    s30 = Vector.FusedMultiplyAdd(x3, y0, s30);
                    s01 = Vector.FusedMultiplyAdd(x0, y1, s01);
                    s11 = Vector.FusedMultiplyAdd(x1, y1, s11);
                    s21 = Vector.FusedMultiplyAdd(x2, y1, s21);
                    s31 = Vector.FusedMultiplyAdd(x3, y1, s31);
                }

                Span<double> sums = [Vector.Sum(s00), Vector.Sum(s10), Vector.Sum(s20), Vector.Sum(s30), Vector.Sum(s01), Vector.Sum(s11), Vector.Sum(s21), Vector.Sum(s31)];
                for (int l = vectorDepth; l < depth; l++)
                {
                    double y0 = b[(j * ldb) + l];
                    double y1 = b[((j + 1) * ldb) + l];
                    for (int t = 0; t < 4; t++)
                    {
                        double x = a[((i + t) * lda) + l];
                        sums[t] += x * y0;
                        sums[4 + t] += x * y1;
                    }
                }

                for (int t = 0; t < 4; t++)
                {
                    c[(j * ldc) + i + t] += alpha * sums[t];
                    c[((j + 1) * ldc) + i + t] += alpha * sums[4 + t];
                }
            }

            for (; j < columns; j++)
            {
                for (int t = 0; t < 4; t++)
                {
                    c[(j * ldc) + i + t] += alpha * DenseKernels.Dot(a.Slice((i + t) * lda, depth), b.Slice(j * ldb, depth));
                }
            }
        }

        for (; i < rows; i++)
        {
            var column = a.Slice(i * lda, depth);
            for (int j = 0; j < columns; j++)
            {
                c[(j * ldc) + i] += alpha * DenseKernels.Dot(column, b.Slice(j * ldb, depth));
            }
        }
    }

    /// <summary>
    /// Left-looking blocked Cholesky: each block column is first updated by every column to its left (one product,
    /// the diagonal block through a scratch tile so the strict upper triangle stays untouched), then its diagonal
    /// block is factored entry by entry and the panel below it solved against that block.
    /// </summary>
    protected override bool CholeskyLowerCore(Span<double> a, int n, int lda)
    {
        Span<double> tile = new double[Block * Block];
        for (int j0 = 0; j0 < n; j0 += Block)
        {
            int jb = Math.Min(Block, n - j0);
            int below = n - j0 - jb;
            if (j0 > 0)
            {
                // Diagonal block: D −= L[j0.., 0..j0]·L[j0.., 0..j0]ᵀ, lower triangle only.
                Multiply(false, true, jb, jb, j0, 1.0, a[j0..], lda, a[j0..], lda, 0.0, tile, jb);
                for (int c = 0; c < jb; c++)
                {
                    for (int r = c; r < jb; r++)
                    {
                        a[((j0 + c) * lda) + j0 + r] -= tile[(c * jb) + r];
                    }
                }

                if (below > 0)
                {
                    Multiply(false, true, below, jb, j0, -1.0, a[(j0 + jb)..], lda, a[j0..], lda, 1.0, a[((j0 * lda) + j0 + jb)..], lda);
                }
            }

            for (int c = 0; c < jb; c++)
            {
                int col = j0 + c;
                var column = a.Slice((col * lda) + col, jb - c);
                double d = column[0];
                for (int k = j0; k < col; k++)
                {
                    double lck = a[(k * lda) + col];
                    d -= lck * lck;
                }

                if (!(d > 0))
                {
                    return false;
                }

                double pivot = Math.Sqrt(d);
                column[0] = pivot;
                for (int r = c + 1; r < jb; r++)
                {
                    int row = j0 + r;
                    double sum = column[r - c];
                    for (int k = j0; k < col; k++)
                    {
                        sum -= a[(k * lda) + row] * a[(k * lda) + col];
                    }

                    column[r - c] = sum / pivot;
                }
            }

            // Panel: X·L_DDᵀ = P, column by column of X: X_c = (P_c − Σ_{k<c} X_k L_DD(c, k)) / L_DD(c, c).
            for (int c = 0; c < jb && below > 0; c++)
            {
                int col = j0 + c;
                var target = a.Slice((col * lda) + j0 + jb, below);
                for (int k = 0; k < c; k++)
                {
                    double factor = a[((j0 + k) * lda) + col];
                    if (factor != 0)
                    {
                        DenseKernels.Axpy(-factor, a.Slice(((j0 + k) * lda) + j0 + jb, below), target);
                    }
                }

                double inverse = 1.0 / a[(col * lda) + col];
                foreach (ref double v in target)
                {
                    v *= inverse;
                }
            }
        }

        return true;
    }

    /// <summary>
    /// L·X = B by row blocks top down (each solved block then removed from the rows below by one product), or
    /// Lᵀ·X = B bottom up (each block first receives the already-solved rows below it through one product).
    /// </summary>
    protected override void SolveLowerCore(bool transpose, int n, int columns, ReadOnlySpan<double> l, int ldl, Span<double> b, int ldb)
    {
        if (!transpose)
        {
            for (int i0 = 0; i0 < n; i0 += Block)
            {
                int ib = Math.Min(Block, n - i0);
                for (int j = 0; j < columns; j++)
                {
                    ForwardBlock(l, ldl, i0, ib, b.Slice((j * ldb) + i0, ib));
                }

                int below = n - i0 - ib;
                if (below > 0)
                {
                    Multiply(false, false, below, columns, ib, -1.0, l[((i0 * ldl) + i0 + ib)..], ldl, b[i0..], ldb, 1.0, b[(i0 + ib)..], ldb);
                }
            }

            return;
        }

        int last = (n - 1) / Block * Block;
        for (int i0 = last; i0 >= 0; i0 -= Block)
        {
            int ib = Math.Min(Block, n - i0);
            int below = n - i0 - ib;
            if (below > 0)
            {
                Multiply(true, false, ib, columns, below, -1.0, l[((i0 * ldl) + i0 + ib)..], ldl, b[(i0 + ib)..], ldb, 1.0, b[i0..], ldb);
            }

            for (int j = 0; j < columns; j++)
            {
                BackwardBlock(l, ldl, i0, ib, b.Slice((j * ldb) + i0, ib));
            }
        }
    }

    /// <summary>x ← L_DD⁻¹x for the diagonal block D = [i0, i0 + size).</summary>
    private static void ForwardBlock(ReadOnlySpan<double> l, int ldl, int i0, int size, Span<double> x)
    {
        for (int k = 0; k < size; k++)
        {
            var column = l.Slice(((i0 + k) * ldl) + i0 + k, size - k);
            double xk = x[k] / column[0];
            x[k] = xk;
            if (xk != 0 && k + 1 < size)
            {
                DenseKernels.Axpy(-xk, column[1..], x[(k + 1)..]);
            }
        }
    }

    /// <summary>x ← L_DD⁻ᵀx for the diagonal block D = [i0, i0 + size).</summary>
    private static void BackwardBlock(ReadOnlySpan<double> l, int ldl, int i0, int size, Span<double> x)
    {
        for (int k = size - 1; k >= 0; k--)
        {
            var column = l.Slice(((i0 + k) * ldl) + i0 + k, size - k);
            double sum = x[k] - DenseKernels.Dot(column[1..], x[(k + 1)..size]);
            x[k] = sum / column[0];
        }
    }

    protected override void MultiplyLowerVectorCore(bool transpose, int n, ReadOnlySpan<double> l, int ldl, Span<double> x)
    {
        if (transpose)
        {
            // (Lᵀx)_k = Σ_{i≥k} L_ik x_i reads only x_i with i ≥ k, so ascending k may overwrite x_k at once.
            for (int k = 0; k < n; k++)
            {
                x[k] = DenseKernels.Dot(l.Slice((k * ldl) + k, n - k), x[k..n]);
            }

            return;
        }

        // (Lx)_i = Σ_{k≤i} L_ik x_k: descending k adds column k below the diagonal while x_k still holds its input.
        for (int k = n - 1; k >= 0; k--)
        {
            var column = l.Slice((k * ldl) + k, n - k);
            double xk = x[k];
            if (xk != 0 && k + 1 < n)
            {
                DenseKernels.Axpy(xk, column[1..], x[(k + 1)..n]);
            }

            x[k] = column[0] * xk;
        }
    }

    protected override void SolveLowerVectorCore(bool transpose, int n, ReadOnlySpan<double> l, int ldl, Span<double> x)
    {
        if (transpose)
        {
            BackwardBlock(l, ldl, 0, n, x[..n]);
        }
        else
        {
            ForwardBlock(l, ldl, 0, n, x[..n]);
        }
    }

    /// <summary>MathNet's symmetric eigenvalue decomposition on a copy of the lower triangle.</summary>
    protected override double[] SymmetricEigenvaluesCore(Span<double> a, int n, int lda)
    {
        var copy = new double[n * n];
        for (int j = 0; j < n; j++)
        {
            for (int i = j; i < n; i++)
            {
                double v = a[(j * lda) + i];
                copy[(j * n) + i] = v;
                copy[(i * n) + j] = v;
            }
        }

        try
        {
            return Matrix.Build.Dense(n, n, copy).Evd(MathNet.Numerics.LinearAlgebra.Symmetricity.Symmetric).EigenValues.Select(z => z.Real).ToArray();
        }
        catch (NonConvergenceException ex)
        {
            throw new NumericScaleException("the symmetric eigenvalue iteration did not converge", ex);
        }
    }
}
