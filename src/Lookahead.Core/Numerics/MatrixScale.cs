using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Numerics;

/// <summary>
/// The size of a matrix's entries, and exact rescaling by a power of two. Decompositions are handed matrices
/// whose largest entry lies in [1, 2), so sums of squares inside them cannot overflow or underflow; dividing
/// by a power of two changes no significant digit, so the results scale back exactly.
/// </summary>
internal static class MatrixScale
{
    /// <summary>True when every entry is finite.</summary>
    public static bool AllFinite(Matrix<double> m)
    {
        var storage = m.AsColumnMajorArray();
        return storage is not null ? DenseKernels.AllFinite(storage) : m.Enumerate().All(double.IsFinite);
    }

    /// <summary>max |m_ij|, 0 for an empty or zero matrix; the caller has checked that every entry is finite.</summary>
    public static double MaxAbs(Matrix<double> m) => m.Enumerate().Select(Math.Abs).DefaultIfEmpty(0).Max();

    /// <summary>The exponent e with 2^e ≤ <paramref name="magnitude"/> &lt; 2^{e+1}; 0 for 0.</summary>
    public static int Exponent(double magnitude) => magnitude > 0 ? Math.ILogB(magnitude) : 0;

    /// <summary>m·2^{−e}, entry by entry (exact unless an entry falls below the normal range).</summary>
    public static Matrix<double> ScaleDown(Matrix<double> m, int exponent) =>
        exponent == 0 ? m : m.Map(v => Math.ScaleB(v, -exponent));
}
