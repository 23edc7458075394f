using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace Lookahead.Core.Planning;

/// <summary>
/// 4×4 tiles of doubles, row-major, one 256-bit vector per row, for the small-model Riccati recursion
/// (<see cref="RiccatiNewtonStep"/>). Every operation reads all of its operands into registers before it stores, so
/// a result may overwrite any of its operands. Needs AVX2 for the in-register transpose and broadcasts.
/// </summary>
internal static unsafe class Tile
{
    /// <summary>Whether this processor runs the tiles (AVX2 and FMA).</summary>
    public static bool IsSupported => Avx2.IsSupported && Fma.IsSupported;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void Copy(double* source, double* target)
    {
        var r0 = Vector256.Load(source);
        var r1 = Vector256.Load(source + 4);
        var r2 = Vector256.Load(source + 8);
        var r3 = Vector256.Load(source + 12);
        Store(r0, r1, r2, r3, target);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void Clear(double* target) => Store(Vector256<double>.Zero, Vector256<double>.Zero, Vector256<double>.Zero, Vector256<double>.Zero, target);

    /// <summary>target += source.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void Add(double* source, double* target) => Store(
        Vector256.Load(target) + Vector256.Load(source),
        Vector256.Load(target + 4) + Vector256.Load(source + 4),
        Vector256.Load(target + 8) + Vector256.Load(source + 8),
        Vector256.Load(target + 12) + Vector256.Load(source + 12),
        target);

    /// <summary>target = −source.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void Negate(double* source, double* target) => Store(
        -Vector256.Load(source),
        -Vector256.Load(source + 4),
        -Vector256.Load(source + 8),
        -Vector256.Load(source + 12),
        target);

    /// <summary>z = add + x·y (add may be null for zero).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void Times(double* x, double* y, double* add, double* z)
    {
        var y0 = Vector256.Load(y);
        var y1 = Vector256.Load(y + 4);
        var y2 = Vector256.Load(y + 8);
        var y3 = Vector256.Load(y + 12);
        var r0 = Combine(x[0], x[1], x[2], x[3], y0, y1, y2, y3, add);
        var r1 = Combine(x[4], x[5], x[6], x[7], y0, y1, y2, y3, add == null ? null : add + 4);
        var r2 = Combine(x[8], x[9], x[10], x[11], y0, y1, y2, y3, add == null ? null : add + 8);
        var r3 = Combine(x[12], x[13], x[14], x[15], y0, y1, y2, y3, add == null ? null : add + 12);
        Store(r0, r1, r2, r3, z);
    }

    /// <summary>z = add + xᵀ·y, or add − xᵀ·y when <paramref name="subtract"/> (add may be null for zero).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void TransposeTimes(double* x, double* y, double* add, double* z, bool subtract = false)
    {
        var y0 = Vector256.Load(y);
        var y1 = Vector256.Load(y + 4);
        var y2 = Vector256.Load(y + 8);
        var y3 = Vector256.Load(y + 12);
        if (subtract)
        {
            y0 = -y0;
            y1 = -y1;
            y2 = -y2;
            y3 = -y3;
        }

        var r0 = Combine(x[0], x[4], x[8], x[12], y0, y1, y2, y3, add);
        var r1 = Combine(x[1], x[5], x[9], x[13], y0, y1, y2, y3, add == null ? null : add + 4);
        var r2 = Combine(x[2], x[6], x[10], x[14], y0, y1, y2, y3, add == null ? null : add + 8);
        var r3 = Combine(x[3], x[7], x[11], x[15], y0, y1, y2, y3, add == null ? null : add + 12);
        Store(r0, r1, r2, r3, z);
    }

    /// <summary>z = ½(z + zᵀ): exactly symmetric, the diagonal unchanged.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void Symmetrise(double* z)
    {
        var r0 = Vector256.Load(z);
        var r1 = Vector256.Load(z + 4);
        var r2 = Vector256.Load(z + 8);
        var r3 = Vector256.Load(z + 12);
        Transposed(r0, r1, r2, r3, out var c0, out var c1, out var c2, out var c3);
        var half = Vector256.Create(0.5);
        Store((r0 + c0) * half, (r1 + c1) * half, (r2 + c2) * half, (r3 + c3) * half, z);
    }

    /// <summary>target = sourceᵀ (all four rows).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void Transpose(double* source, double* target)
    {
        Transposed(Vector256.Load(source), Vector256.Load(source + 4), Vector256.Load(source + 8), Vector256.Load(source + 12), out var c0, out var c1, out var c2, out var c3);
        Store(c0, c1, c2, c3, target);
    }

    /// <summary>The first <paramref name="rows"/> rows of a tile to rows of 4 at <paramref name="target"/>.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void CopyRows(double* source, double* target, int rows)
    {
        for (int i = 0; i < rows; i++)
        {
            Vector256.Store(Vector256.Load(source + (i * 4)), target + (i * 4));
        }
    }

    /// <summary>Row <paramref name="row"/> of a tile to <paramref name="target"/>.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void StoreRow(double* source, int row, double* target) => Vector256.Store(Vector256.Load(source + (row * 4)), target);

    /// <summary>add + Σ_l x_l·(row l of the tile at y) — the tile's transpose times x, the entries of x broadcast in registers.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector256<double> Combine(Vector256<double> x, double* y, Vector256<double> add)
    {
        var first = Vector256.FusedMultiplyAdd(Avx2.Permute4x64(x, 0x00), Vector256.Load(y), add);
        first = Vector256.FusedMultiplyAdd(Avx2.Permute4x64(x, 0x55), Vector256.Load(y + 4), first);
        var second = Vector256.FusedMultiplyAdd(Avx2.Permute4x64(x, 0xFF), Vector256.Load(y + 12), Avx2.Permute4x64(x, 0xAA) * Vector256.Load(y + 8));
        return first + second;
    }

    /// <summary>The first <paramref name="count"/> (≤ 4) doubles at <paramref name="source"/>, the rest zero; reads nothing beyond them.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector256<double> LoadPartial(double* source, int count) => count switch
    {
        4 => Vector256.Load(source),
        3 => Vector256.Create(source[0], source[1], source[2], 0),
        2 => Vector256.Create(source[0], source[1], 0, 0),
        1 => Vector256.Create(source[0], 0, 0, 0),
        _ => Vector256<double>.Zero,
    };

    /// <summary>The first <paramref name="count"/> (≤ 4) entries of x to <paramref name="target"/>; writes nothing beyond them.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void StorePartial(Vector256<double> x, double* target, int count)
    {
        if (count == 4)
        {
            Vector256.Store(x, target);
            return;
        }

        for (int i = 0; i < count; i++)
        {
            target[i] = x.GetElement(i);
        }
    }

    /// <summary>add + a0·y0 + a1·y1 + a2·y2 + a3·y3 as two independent pairs, so the chain is two operations shorter.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static Vector256<double> Combine(double a0, double a1, double a2, double a3, Vector256<double> y0, Vector256<double> y1, Vector256<double> y2, Vector256<double> y3, double* add)
    {
        var first = add == null ? Vector256.Create(a0) * y0 : Vector256.FusedMultiplyAdd(Vector256.Create(a0), y0, Vector256.Load(add));
        first = Vector256.FusedMultiplyAdd(Vector256.Create(a1), y1, first);
        var second = Vector256.FusedMultiplyAdd(Vector256.Create(a3), y3, Vector256.Create(a2) * y2);
        return first + second;
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void Transposed(Vector256<double> r0, Vector256<double> r1, Vector256<double> r2, Vector256<double> r3, out Vector256<double> c0, out Vector256<double> c1, out Vector256<double> c2, out Vector256<double> c3)
    {
        var t0 = Avx.UnpackLow(r0, r1);
        var t1 = Avx.UnpackHigh(r0, r1);
        var t2 = Avx.UnpackLow(r2, r3);
        var t3 = Avx.UnpackHigh(r2, r3);
        c0 = Avx.Permute2x128(t0, t2, 0x20);
        c1 = Avx.Permute2x128(t1, t3, 0x20);
        c2 = Avx.Permute2x128(t0, t2, 0x31);
        c3 = Avx.Permute2x128(t1, t3, 0x31);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void Store(Vector256<double> r0, Vector256<double> r1, Vector256<double> r2, Vector256<double> r3, double* target)
    {
        Vector256.Store(r0, target);
        Vector256.Store(r1, target + 4);
        Vector256.Store(r2, target + 8);
        Vector256.Store(r3, target + 12);
    }
}
