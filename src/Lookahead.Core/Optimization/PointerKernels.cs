using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace Lookahead.Core.Optimization;

/// <summary>
/// Dot products over raw pointers for the range-space method's inner loops, where spans' bounds checks and slicing
/// cost more than the arithmetic on the small lengths involved.
/// </summary>
internal static unsafe class PointerKernels
{
    /// <summary>[a_0ᵀv, a_1ᵀv, a_2ᵀv, a_3ᵀv] over the first <paramref name="length"/> entries (a multiple of four).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector256<double> FourDots(double* a0, double* a1, double* a2, double* a3, double* v, int length)
    {
        var s0 = Vector256<double>.Zero;
        var s1 = Vector256<double>.Zero;
        var s2 = Vector256<double>.Zero;
        var s3 = Vector256<double>.Zero;
        for (int c = 0; c < length; c += 4)
        {
            var vv = Vector256.Load(v + c);
            s0 = Vector256.FusedMultiplyAdd(Vector256.Load(a0 + c), vv, s0);
            s1 = Vector256.FusedMultiplyAdd(Vector256.Load(a1 + c), vv, s1);
            s2 = Vector256.FusedMultiplyAdd(Vector256.Load(a2 + c), vv, s2);
            s3 = Vector256.FusedMultiplyAdd(Vector256.Load(a3 + c), vv, s3);
        }

        return SumsOfFour(s0, s1, s2, s3);
    }

    /// <summary>[Σs0, Σs1, Σs2, Σs3]: the four horizontal sums at once (two pairwise adds and a swap of halves).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector256<double> SumsOfFour(Vector256<double> s0, Vector256<double> s1, Vector256<double> s2, Vector256<double> s3)
    {
        if (Avx.IsSupported)
        {
            var s01 = Avx.HorizontalAdd(s0, s1);
            var s23 = Avx.HorizontalAdd(s2, s3);
            return Avx.Permute2x128(s01, s23, 0x20) + Avx.Permute2x128(s01, s23, 0x31);
        }

        return Vector256.Create(Vector256.Sum(s0), Vector256.Sum(s1), Vector256.Sum(s2), Vector256.Sum(s3));
    }

    /// <summary>Σ_i row[index_i]·weight_i, four gathered entries at a time.</summary>
    public static double GatherDot(double* row, int* index, double* weight, int count)
    {
        int i = 0;
        double sum = 0;
        if (Avx2.IsSupported && Fma.IsSupported)
        {
            var acc = Vector256<double>.Zero;
            for (; i + 4 <= count; i += 4)
            {
                acc = Fma.MultiplyAdd(Avx2.GatherVector256(row, Vector128.Load(index + i), 8), Vector256.Load(weight + i), acc);
            }

            sum = Vector256.Sum(acc);
        }

        for (; i < count; i++)
        {
            sum += row[index[i]] * weight[i];
        }

        return sum;
    }

    /// <summary>target_i = row[index_i], four at a time.</summary>
    public static void Gather(double* row, int* index, double* target, int count)
    {
        int i = 0;
        if (Avx2.IsSupported)
        {
            for (; i + 4 <= count; i += 4)
            {
                Vector256.Store(Avx2.GatherVector256(row, Vector128.Load(index + i), 8), target + i);
            }
        }

        for (; i < count; i++)
        {
            target[i] = row[index[i]];
        }
    }

    /// <summary>Σ_{k&lt;length} a_k b_k with two vector accumulators.</summary>
    public static double Dot(double* a, double* b, int length)
    {
        var acc0 = Vector256<double>.Zero;
        var acc1 = Vector256<double>.Zero;
        int k = 0;
        for (; k + 8 <= length; k += 8)
        {
            acc0 = Vector256.FusedMultiplyAdd(Vector256.Load(a + k), Vector256.Load(b + k), acc0);
            acc1 = Vector256.FusedMultiplyAdd(Vector256.Load(a + k + 4), Vector256.Load(b + k + 4), acc1);
        }

        if (k + 4 <= length)
        {
            acc0 = Vector256.FusedMultiplyAdd(Vector256.Load(a + k), Vector256.Load(b + k), acc0);
            k += 4;
        }

        double sum = Vector256.Sum(acc0 + acc1);
        for (; k < length; k++)
        {
            sum += a[k] * b[k];
        }

        return sum;
    }

    /// <summary>
    /// to[i] = from[i] for i &lt; count, four at a time in ascending order (so a copy one or more entries to the left
    /// within the same row is safe); inline where a call to a general copy would cost more than the few entries moved.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void Copy(double* from, double* to, int count)
    {
        int i = 0;
        for (; i + 4 <= count; i += 4)
        {
            Vector256.Store(Vector256.Load(from + i), to + i);
        }

        for (; i < count; i++)
        {
            to[i] = from[i];
        }
    }
}
