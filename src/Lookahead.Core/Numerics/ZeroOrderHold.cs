using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Numerics;

/// <summary>
/// Exact discretisation of x' = A x + B u with u held constant over each sample:
/// exp([[A, B], [0, 0]]·T) = [[A_d, B_d], [0, I]].
/// </summary>
public static class ZeroOrderHold
{
    /// <summary>Returns (A_d, B_d) for sample time <paramref name="sampleTime"/> &gt; 0 (seconds).</summary>
    /// <exception cref="ArgumentException">Shapes do not match, an entry is not finite, or the exponential overflows.</exception>
    public static (Matrix<double> Ad, Matrix<double> Bd) Discretise(Matrix<double> a, Matrix<double> b, double sampleTime)
    {
        if (a.RowCount != a.ColumnCount || b.RowCount != a.RowCount)
        {
            throw new ArgumentException("A must be n×n and B n×m");
        }

        if (!(sampleTime > 0) || !double.IsFinite(sampleTime))
        {
            throw new ArgumentOutOfRangeException(nameof(sampleTime), "the sample time must be finite and > 0");
        }

        int n = a.RowCount;
        int m = b.ColumnCount;
        var block = Matrix<double>.Build.Dense(n + m, n + m);
        block.SetSubMatrix(0, 0, a * sampleTime);
        block.SetSubMatrix(0, n, b * sampleTime);
        var e = MatrixExponential.Compute(block);
        if (e.Enumerate().Any(v => !double.IsFinite(v)))
        {
            throw new ArgumentException("the zero-order hold overflows: A·T or B·T is too large");
        }

        return (e.SubMatrix(0, n, 0, n), e.SubMatrix(0, n, n, m));
    }
}
