using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;

namespace Lookahead.Core.Numerics;

/// <summary>
/// Request-time kernels on spans. They allocate nothing, check lengths up front, and no destination may alias an
/// input. Layout is part of each kernel's contract and named in its doc: the plain products read M row-major
/// (row i at i·columns); the <c>…Columns</c> and <c>…Transposed…</c> kernels read M column-major (column j at
/// j·rows), which is how the gain maps and the plant matrices are stored for the rollout.
/// </summary>
public static class DenseKernels
{
    /// <summary>Σ x_i y_i, vectorised.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static double Dot(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        if (x.Length != y.Length)
        {
            throw new ArgumentException("x and y must have the same length");
        }

        int i = 0;
        double sum = 0;
        if (Vector.IsHardwareAccelerated && x.Length >= Vector<double>.Count * 2)
        {
            var xv = MemoryMarshal.Cast<double, Vector<double>>(x);
            var yv = MemoryMarshal.Cast<double, Vector<double>>(y);
            var acc0 = Vector<double>.Zero;
            var acc1 = Vector<double>.Zero;
            int v = 0;
            for (; v + 1 < xv.Length; v += 2)
            {
                acc0 += xv[v] * yv[v];
                acc1 += xv[v + 1] * yv[v + 1];
            }

            for (; v < xv.Length; v++)
            {
                acc0 += xv[v] * yv[v];
            }

            sum = Vector.Sum(acc0 + acc1);
            i = xv.Length * Vector<double>.Count;
        }

        for (; i < x.Length; i++)
        {
            sum += x[i] * y[i];
        }

        return sum;
    }

    /// <summary>y += M x for row-major M (y.Length × x.Length): y_i += Σ_j M[i·cols + j] x_j, one dot product per row.</summary>
    /// <exception cref="ArgumentException">Lengths do not match.</exception>
    public static void MultiplyAdd(ReadOnlySpan<double> m, ReadOnlySpan<double> x, Span<double> y)
    {
        int cols = x.Length;
        int rows = y.Length;
        if (m.Length != rows * cols)
        {
            throw new ArgumentException($"matrix has {m.Length} entries; expected {rows}×{cols}");
        }

        for (int i = 0; i < rows; i++)
        {
            y[i] += Dot(m.Slice(i * cols, cols), x);
        }
    }

    /// <summary>y = M x for row-major M (y.Length × x.Length).</summary>
    public static void Multiply(ReadOnlySpan<double> m, ReadOnlySpan<double> x, Span<double> y)
    {
        y.Clear();
        MultiplyAdd(m, x, y);
    }

    /// <summary>
    /// y += M x for M stored column-major (x.Length columns of y.Length entries each, column j at j·y.Length).
    /// Each column is one vectorised AXPY, so there are no horizontal sums: this is the fast form for the short,
    /// wide products of a plan (12×12 in a few nanoseconds). For Mᵀx use <see cref="MultiplyTransposedAdd"/>.
    /// </summary>
    /// <exception cref="ArgumentException">Lengths do not match.</exception>
    public static void MultiplyAddColumns(ReadOnlySpan<double> m, ReadOnlySpan<double> x, Span<double> y) =>
        MultiplyAddColumns(m, y.Length, x, y);

    /// <summary>
    /// y += M[0..y.Length) x: the first y.Length rows of M times x, for M stored column-major with
    /// <paramref name="rowCount"/> rows and x.Length columns (column j at j·rowCount). With y.Length = rowCount this is
    /// the whole product; the first move of a plan takes only the first m rows of its N·m-row gain maps.
    /// Columns whose x_j is zero are skipped.
    /// </summary>
    /// <exception cref="ArgumentException">Lengths do not match, or y is longer than a column.</exception>
    public static void MultiplyAddColumns(ReadOnlySpan<double> m, int rowCount, ReadOnlySpan<double> x, Span<double> y)
    {
        int cols = x.Length;
        if (m.Length != rowCount * cols || y.Length > rowCount)
        {
            throw new ArgumentException($"matrix has {m.Length} entries; expected {rowCount}×{cols} with at least {y.Length} rows");
        }

        for (int j = 0; j < cols; j++)
        {
            double xj = x[j];
            if (xj != 0)
            {
                Axpy(xj, m.Slice(j * rowCount, y.Length), y);
            }
        }
    }

    /// <summary>
    /// y += Mᵀ x for M stored column-major with x.Length rows and y.Length columns (column j at j·x.Length):
    /// y_j += Σ_i M_ij x_i, one dot product with each contiguous column. This is how the adjoint recursion
    /// applies Aᵀ, Bᵀ and Cᵀ to the same column-major arrays the rollout uses for A, B and C.
    /// </summary>
    /// <exception cref="ArgumentException">Lengths do not match.</exception>
    public static void MultiplyTransposedAdd(ReadOnlySpan<double> m, ReadOnlySpan<double> x, Span<double> y)
    {
        int rows = x.Length;
        int cols = y.Length;
        if (m.Length != rows * cols)
        {
            throw new ArgumentException($"matrix has {m.Length} entries; expected {rows}×{cols}");
        }

        for (int j = 0; j < cols; j++)
        {
            y[j] += Dot(m.Slice(j * rows, rows), x);
        }
    }

    /// <summary>
    /// y = M x + M₂ x₂ for column-major M (y.Length × x.Length) and M₂ (y.Length × x₂.Length), accumulating
    /// blocks of up to 16 rows in registers across all columns, so y is written once instead of once per column.
    /// The rollout's x⁺ = A x + B u is exactly this.
    /// </summary>
    /// <exception cref="ArgumentException">Lengths do not match.</exception>
    public static void MultiplyColumns(ReadOnlySpan<double> m, ReadOnlySpan<double> x, ReadOnlySpan<double> m2, ReadOnlySpan<double> x2, Span<double> y)
    {
        int rows = y.Length;
        if (m.Length != rows * x.Length || m2.Length != rows * x2.Length)
        {
            throw new ArgumentException("matrix sizes do not match the vectors");
        }

        int width = Vector<double>.Count;
        int row = 0;
        if (Vector.IsHardwareAccelerated)
        {
            for (; row + (4 * width) <= rows; row += 4 * width)
            {
                Block4(m, x, m2, x2, rows, row, y);
            }

            for (; row + width <= rows; row += width)
            {
                var acc = Vector<double>.Zero;
                for (int j = 0; j < x.Length; j++)
                {
                    acc = Vector.FusedMultiplyAdd(new Vector<double>(x[j]), new Vector<double>(m.Slice((j * rows) + row, width)), acc);
                }

                for (int j = 0; j < x2.Length; j++)
                {
                    acc = Vector.FusedMultiplyAdd(new Vector<double>(x2[j]), new Vector<double>(m2.Slice((j * rows) + row, width)), acc);
                }

                acc.CopyTo(y.Slice(row, width));
            }
        }

        for (; row < rows; row++)
        {
            double sum = 0;
            for (int j = 0; j < x.Length; j++)
            {
                sum += m[(j * rows) + row] * x[j];
            }

            for (int j = 0; j < x2.Length; j++)
            {
                sum += m2[(j * rows) + row] * x2[j];
            }

            y[row] = sum;
        }
    }

    private static void Block4(ReadOnlySpan<double> m, ReadOnlySpan<double> x, ReadOnlySpan<double> m2, ReadOnlySpan<double> x2, int rows, int row, Span<double> y)
    {
        int width = Vector<double>.Count;
        var a0 = Vector<double>.Zero;
        var a1 = Vector<double>.Zero;
        var a2 = Vector<double>.Zero;
        var a3 = Vector<double>.Zero;
        for (int j = 0; j < x.Length; j++)
        {
            var xj = new Vector<double>(x[j]);
            var column = m.Slice((j * rows) + row, 4 * width);
            a0 = Vector.FusedMultiplyAdd(xj, new Vector<double>(column), a0);
            a1 = Vector.FusedMultiplyAdd(xj, new Vector<double>(column[width..]), a1);
            a2 = Vector.FusedMultiplyAdd(xj, new Vector<double>(column[(2 * width)..]), a2);
            a3 = Vector.FusedMultiplyAdd(xj, new Vector<double>(column[(3 * width)..]), a3);
        }

        for (int j = 0; j < x2.Length; j++)
        {
            var xj = new Vector<double>(x2[j]);
            var column = m2.Slice((j * rows) + row, 4 * width);
            a0 = Vector.FusedMultiplyAdd(xj, new Vector<double>(column), a0);
            a1 = Vector.FusedMultiplyAdd(xj, new Vector<double>(column[width..]), a1);
            a2 = Vector.FusedMultiplyAdd(xj, new Vector<double>(column[(2 * width)..]), a2);
            a3 = Vector.FusedMultiplyAdd(xj, new Vector<double>(column[(3 * width)..]), a3);
        }

        var target = y.Slice(row, 4 * width);
        a0.CopyTo(target);
        a1.CopyTo(target[width..]);
        a2.CopyTo(target[(2 * width)..]);
        a3.CopyTo(target[(3 * width)..]);
    }

    /// <summary>y += a·x, vectorised with fused multiply–add where the hardware has it.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void Axpy(double a, ReadOnlySpan<double> x, Span<double> y)
    {
        if (x.Length != y.Length)
        {
            throw new ArgumentException("x and y must have the same length");
        }

        int i = 0;
        if (Vector.IsHardwareAccelerated && x.Length >= Vector<double>.Count)
        {
            var av = new Vector<double>(a);
            var xv = MemoryMarshal.Cast<double, Vector<double>>(x);
            var yv = MemoryMarshal.Cast<double, Vector<double>>(y);
            for (int v = 0; v < xv.Length; v++)
            {
                yv[v] = Vector.FusedMultiplyAdd(av, xv[v], yv[v]);
            }

            i = xv.Length * Vector<double>.Count;
        }

        for (; i < x.Length; i++)
        {
            y[i] += a * x[i];
        }
    }

    /// <summary>True when every entry is finite. A vectorised sum: NaN and ±∞ survive addition, so one test at the end suffices.</summary>
    public static bool AllFinite(ReadOnlySpan<double> x)
    {
        var acc = Vector<double>.Zero;
        int i = 0;
        if (Vector.IsHardwareAccelerated && x.Length >= Vector<double>.Count)
        {
            var xv = MemoryMarshal.Cast<double, Vector<double>>(x);
            for (int v = 0; v < xv.Length; v++)
            {
                // x·0 is 0 for finite x and NaN for ±∞ or NaN, so large finite values cannot overflow the test.
                acc += xv[v] * Vector<double>.Zero;
            }

            i = xv.Length * Vector<double>.Count;
        }

        double sum = Vector.Sum(acc);
        for (; i < x.Length; i++)
        {
            sum += x[i] * 0.0;
        }

        return sum == 0;
    }

    /// <summary>xᵀ W x for a row-major square W; when <paramref name="diagonal"/> is set, only W's diagonal is read.</summary>
    public static double QuadraticForm(ReadOnlySpan<double> w, ReadOnlySpan<double> x, bool diagonal)
    {
        int n = x.Length;
        if (w.Length != n * n)
        {
            throw new ArgumentException($"weight has {w.Length} entries; expected {n}×{n}");
        }

        double sum = 0;
        if (diagonal)
        {
            for (int i = 0; i < n; i++)
            {
                sum += w[(i * n) + i] * x[i] * x[i];
            }

            return sum;
        }

        for (int i = 0; i < n; i++)
        {
            sum += x[i] * Dot(w.Slice(i * n, n), x);
        }

        return sum;
    }

    /// <summary>True when every off-diagonal entry of the row-major square matrix is exactly zero.</summary>
    public static bool IsDiagonal(ReadOnlySpan<double> w, int n)
    {
        for (int i = 0; i < n; i++)
        {
            for (int j = 0; j < n; j++)
            {
                if (i != j && w[(i * n) + j] != 0)
                {
                    return false;
                }
            }
        }

        return true;
    }
}
