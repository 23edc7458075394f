using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;
using BenchmarkDotNet.Attributes;
using BenchmarkDotNet.Configs;
using Lookahead.Core.Numerics;

namespace Lookahead.Benchmarks;

/// <summary>
/// The rate this machine reaches on the kind of arithmetic a plan does: dot products and AXPYs on vectors that sit
/// in L1 (2 × 256 doubles = 4 KiB), repeated <see cref="Reps"/> times per invocation, plus a 90×12
/// matrix-vector product the size of M1's gain multiply (row-major with the core's row kernel, column-major with the
/// column kernel the plan uses, and a hand-tuned row-major kernel). Every Mean is per single kernel call. A register-only FMA loop
/// shows the arithmetic ceiling without loads.
/// </summary>
[Config(typeof(PeakFlopsConfig))]
public class PeakFlopsBenchmark
{
    public const int Length = 256;
    public const int Reps = 1000;
    public const int Rows = 90;
    public const int Columns = 12;
    public const int RegisterSteps = 1024;
    public const int RegisterAccumulators = 12;

    private double[] xStore = null!;
    private double[] yStore = null!;
    private int xOffset;
    private int yOffset;
    private double[] matrix = null!;
    private double[] matrixColumns = null!;
    private double[] vector = null!;
    private double[] result = null!;

    private Span<double> X => xStore.AsSpan(xOffset, Length);

    private Span<double> Y => yStore.AsSpan(yOffset, Length);

    /// <summary>Flops of one call of each method (multiply-add = 2).</summary>
    public static double? FlopsOf(string method) => method switch
    {
        nameof(DotVectorT) or nameof(DotFma256) or nameof(DotFma512) or nameof(AxpyFma256) => 2.0 * Length,
        nameof(FmaRegisters256) => 2.0 * 4 * RegisterAccumulators * RegisterSteps,
        nameof(MatVecCoreRows) or nameof(MatVecCoreColumns) or nameof(MatVecTuned) => 2.0 * Rows * Columns,
        _ => null,
    };

    [GlobalSetup]
    public void Setup()
    {
        (xStore, xOffset) = Aligned(Length);
        (yStore, yOffset) = Aligned(Length);
        var random = new Random(12345);
        for (int i = 0; i < Length; i++)
        {
            X[i] = random.NextDouble() - 0.5;
            Y[i] = random.NextDouble() - 0.5;
        }

        matrix = Enumerable.Range(0, Rows * Columns).Select(_ => random.NextDouble() - 0.5).ToArray();
        matrixColumns = new double[Rows * Columns];
        for (int i = 0; i < Rows; i++)
        {
            for (int j = 0; j < Columns; j++)
            {
                matrixColumns[(j * Rows) + i] = matrix[(i * Columns) + j];
            }
        }

        vector = Enumerable.Range(0, Columns).Select(_ => random.NextDouble() - 0.5).ToArray();
        result = new double[Rows];

        var expected = new double[Rows];
        DenseKernels.Multiply(matrix, vector, expected);
        foreach (var (name, kernel) in new (string, Func<double>)[] { (nameof(MatVecTuned), MatVecTuned), (nameof(MatVecCoreColumns), MatVecCoreColumns) })
        {
            kernel();
            for (int i = 0; i < Rows; i++)
            {
                if (Math.Abs(expected[i] - result[i]) > 1e-12)
                {
                    throw new InvalidOperationException($"{name} disagrees with DenseKernels.Multiply");
                }
            }
        }

        Console.WriteLine($"// Vector<double>.Count = {Vector<double>.Count}, Vector.IsHardwareAccelerated = {Vector.IsHardwareAccelerated}, Fma.IsSupported = {Fma.IsSupported}, Avx512F.IsSupported = {Avx512F.IsSupported}, Vector512.IsHardwareAccelerated = {Vector512.IsHardwareAccelerated}");
    }

    /// <summary>Dot product with Vector&lt;double&gt;, separate multiply and add, 4 accumulators.</summary>
    [Benchmark(OperationsPerInvoke = Reps)]
    public double DotVectorT()
    {
        ReadOnlySpan<double> x = X;
        ReadOnlySpan<double> y = Y;
        double total = 0;
        for (int rep = 0; rep < Reps; rep++)
        {
            total += Kernels.DotVectorT(x, y);
        }

        return total;
    }

    /// <summary>Dot product with Vector256 and FMA, 8 accumulators.</summary>
    [Benchmark(OperationsPerInvoke = Reps)]
    public double DotFma256()
    {
        ReadOnlySpan<double> x = X;
        ReadOnlySpan<double> y = Y;
        double total = 0;
        for (int rep = 0; rep < Reps; rep++)
        {
            total += Kernels.DotFma256(x, y);
        }

        return total;
    }

    /// <summary>Dot product with Vector512 and FMA (AVX-512F), 8 accumulators; Vector512 arithmetic otherwise.</summary>
    [Benchmark(OperationsPerInvoke = Reps)]
    public double DotFma512()
    {
        ReadOnlySpan<double> x = X;
        ReadOnlySpan<double> y = Y;
        double total = 0;
        for (int rep = 0; rep < Reps; rep++)
        {
            total += Kernels.DotFma512(x, y);
        }

        return total;
    }

    /// <summary>y ← y + a·x with Vector256 and FMA; a alternates sign so y stays bounded.</summary>
    [Benchmark(OperationsPerInvoke = Reps)]
    public double AxpyFma256()
    {
        ReadOnlySpan<double> x = X;
        Span<double> y = Y;
        for (int rep = 0; rep < Reps; rep++)
        {
            Kernels.AxpyFma256((rep & 1) == 0 ? 0.5 : -0.5, x, y);
        }

        return y[0];
    }

    /// <summary>FMA throughput with no memory traffic: 12 independent Vector256 accumulators.</summary>
    [Benchmark]
    public double FmaRegisters256() => Kernels.FmaRegisters256(RegisterSteps);

    /// <summary>y = M x, 90×12 row-major, with the core's DenseKernels.Multiply (one Dot per row).</summary>
    [Benchmark(OperationsPerInvoke = Reps)]
    public double MatVecCoreRows()
    {
        for (int rep = 0; rep < Reps; rep++)
        {
            DenseKernels.Multiply(matrix, vector, result);
        }

        return result[0];
    }

    /// <summary>y = M x, 90×12 stored column-major, with DenseKernels.MultiplyAddColumns (one AXPY per column), as the plan's gain multiply does.</summary>
    [Benchmark(OperationsPerInvoke = Reps)]
    public double MatVecCoreColumns()
    {
        for (int rep = 0; rep < Reps; rep++)
        {
            Array.Clear(result);
            DenseKernels.MultiplyAddColumns(matrixColumns, vector, result);
        }

        return result[0];
    }

    /// <summary>y = M x, 90×12 row-major, x held in three Vector256 registers, one FMA chain and one reduction per row.</summary>
    [Benchmark(OperationsPerInvoke = Reps)]
    public double MatVecTuned()
    {
        for (int rep = 0; rep < Reps; rep++)
        {
            Kernels.MatVec12(matrix, vector, result);
        }

        return result[0];
    }

    private static (double[] Store, int Offset) Aligned(int length)
    {
        // Pinned on the pinned-object heap, so the 64-byte alignment found here holds for the array's lifetime.
        var store = GC.AllocateArray<double>(length + 8, pinned: true);
        var handle = GCHandle.Alloc(store, GCHandleType.Pinned);
        long address = handle.AddrOfPinnedObject().ToInt64();
        handle.Free();
        int offset = (int)(((64 - (address % 64)) % 64) / sizeof(double));
        return (store, offset);
    }

    private sealed class PeakFlopsConfig : ManualConfig
    {
        public PeakFlopsConfig()
        {
            AddColumn(new GflopsColumn(c => FlopsOf(c.Descriptor.WorkloadMethod.Name)));
        }
    }
}

/// <summary>The kernels of <see cref="PeakFlopsBenchmark"/>.</summary>
internal static class Kernels
{
    [MethodImpl(MethodImplOptions.NoInlining)]
    public static double DotVectorT(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        var xv = MemoryMarshal.Cast<double, Vector<double>>(x);
        var yv = MemoryMarshal.Cast<double, Vector<double>>(y);
        Vector<double> a0 = Vector<double>.Zero, a1 = Vector<double>.Zero, a2 = Vector<double>.Zero, a3 = Vector<double>.Zero;
        int i = 0;
        for (; i + 3 < xv.Length; i += 4)
        {
            a0 += xv[i] * yv[i];
            a1 += xv[i + 1] * yv[i + 1];
            a2 += xv[i + 2] * yv[i + 2];
            a3 += xv[i + 3] * yv[i + 3];
        }

        for (; i < xv.Length; i++)
        {
            a0 += xv[i] * yv[i];
        }

        double sum = Vector.Sum((a0 + a1) + (a2 + a3));
        for (int k = xv.Length * Vector<double>.Count; k < x.Length; k++)
        {
            sum += x[k] * y[k];
        }

        return sum;
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static Vector256<double> Fma256(Vector256<double> a, Vector256<double> b, Vector256<double> c) =>
        Fma.IsSupported ? Fma.MultiplyAdd(a, b, c) : (a * b) + c;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static Vector512<double> Fma512(Vector512<double> a, Vector512<double> b, Vector512<double> c) =>
        Avx512F.IsSupported ? Avx512F.FusedMultiplyAdd(a, b, c) : (a * b) + c;

    /// <summary>x and y must have a length that is a multiple of 32. Loads without bounds checks (the length is checked once).</summary>
    [MethodImpl(MethodImplOptions.NoInlining)]
    public static double DotFma256(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        if (x.Length != y.Length || x.Length % 32 != 0)
        {
            throw new ArgumentException("lengths must be equal multiples of 32");
        }

        ref double xr = ref MemoryMarshal.GetReference(x);
        ref double yr = ref MemoryMarshal.GetReference(y);
        var a0 = Vector256<double>.Zero;
        var a1 = Vector256<double>.Zero;
        var a2 = Vector256<double>.Zero;
        var a3 = Vector256<double>.Zero;
        var a4 = Vector256<double>.Zero;
        var a5 = Vector256<double>.Zero;
        var a6 = Vector256<double>.Zero;
        var a7 = Vector256<double>.Zero;
        for (nuint i = 0; i < (nuint)x.Length; i += 32)
        {
            a0 = Fma256(Vector256.LoadUnsafe(ref xr, i), Vector256.LoadUnsafe(ref yr, i), a0);
            a1 = Fma256(Vector256.LoadUnsafe(ref xr, i + 4), Vector256.LoadUnsafe(ref yr, i + 4), a1);
            a2 = Fma256(Vector256.LoadUnsafe(ref xr, i + 8), Vector256.LoadUnsafe(ref yr, i + 8), a2);
            a3 = Fma256(Vector256.LoadUnsafe(ref xr, i + 12), Vector256.LoadUnsafe(ref yr, i + 12), a3);
            a4 = Fma256(Vector256.LoadUnsafe(ref xr, i + 16), Vector256.LoadUnsafe(ref yr, i + 16), a4);
            a5 = Fma256(Vector256.LoadUnsafe(ref xr, i + 20), Vector256.LoadUnsafe(ref yr, i + 20), a5);
            a6 = Fma256(Vector256.LoadUnsafe(ref xr, i + 24), Vector256.LoadUnsafe(ref yr, i + 24), a6);
            a7 = Fma256(Vector256.LoadUnsafe(ref xr, i + 28), Vector256.LoadUnsafe(ref yr, i + 28), a7);
        }

        return Vector256.Sum(((a0 + a1) + (a2 + a3)) + ((a4 + a5) + (a6 + a7)));
    }

    /// <summary>x and y must have a length that is a multiple of 64.</summary>
    [MethodImpl(MethodImplOptions.NoInlining)]
    public static double DotFma512(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        if (x.Length != y.Length || x.Length % 64 != 0)
        {
            throw new ArgumentException("lengths must be equal multiples of 64");
        }

        ref double xr = ref MemoryMarshal.GetReference(x);
        ref double yr = ref MemoryMarshal.GetReference(y);
        var a0 = Vector512<double>.Zero;
        var a1 = Vector512<double>.Zero;
        var a2 = Vector512<double>.Zero;
        var a3 = Vector512<double>.Zero;
        var a4 = Vector512<double>.Zero;
        var a5 = Vector512<double>.Zero;
        var a6 = Vector512<double>.Zero;
        var a7 = Vector512<double>.Zero;
        for (nuint i = 0; i < (nuint)x.Length; i += 64)
        {
            a0 = Fma512(Vector512.LoadUnsafe(ref xr, i), Vector512.LoadUnsafe(ref yr, i), a0);
            a1 = Fma512(Vector512.LoadUnsafe(ref xr, i + 8), Vector512.LoadUnsafe(ref yr, i + 8), a1);
            a2 = Fma512(Vector512.LoadUnsafe(ref xr, i + 16), Vector512.LoadUnsafe(ref yr, i + 16), a2);
            a3 = Fma512(Vector512.LoadUnsafe(ref xr, i + 24), Vector512.LoadUnsafe(ref yr, i + 24), a3);
            a4 = Fma512(Vector512.LoadUnsafe(ref xr, i + 32), Vector512.LoadUnsafe(ref yr, i + 32), a4);
            a5 = Fma512(Vector512.LoadUnsafe(ref xr, i + 40), Vector512.LoadUnsafe(ref yr, i + 40), a5);
            a6 = Fma512(Vector512.LoadUnsafe(ref xr, i + 48), Vector512.LoadUnsafe(ref yr, i + 48), a6);
            a7 = Fma512(Vector512.LoadUnsafe(ref xr, i + 56), Vector512.LoadUnsafe(ref yr, i + 56), a7);
        }

        return Vector512.Sum(((a0 + a1) + (a2 + a3)) + ((a4 + a5) + (a6 + a7)));
    }

    /// <summary>y ← y + a·x; length a multiple of 16.</summary>
    [MethodImpl(MethodImplOptions.NoInlining)]
    public static void AxpyFma256(double a, ReadOnlySpan<double> x, Span<double> y)
    {
        if (x.Length != y.Length || x.Length % 16 != 0)
        {
            throw new ArgumentException("lengths must be equal multiples of 16");
        }

        ref double xr = ref MemoryMarshal.GetReference(x);
        ref double yr = ref MemoryMarshal.GetReference(y);
        var av = Vector256.Create(a);
        for (nuint i = 0; i < (nuint)x.Length; i += 16)
        {
            Fma256(av, Vector256.LoadUnsafe(ref xr, i), Vector256.LoadUnsafe(ref yr, i)).StoreUnsafe(ref yr, i);
            Fma256(av, Vector256.LoadUnsafe(ref xr, i + 4), Vector256.LoadUnsafe(ref yr, i + 4)).StoreUnsafe(ref yr, i + 4);
            Fma256(av, Vector256.LoadUnsafe(ref xr, i + 8), Vector256.LoadUnsafe(ref yr, i + 8)).StoreUnsafe(ref yr, i + 8);
            Fma256(av, Vector256.LoadUnsafe(ref xr, i + 12), Vector256.LoadUnsafe(ref yr, i + 12)).StoreUnsafe(ref yr, i + 12);
        }
    }

    /// <summary>12 independent chains acc ← acc·c + d, <paramref name="steps"/> FMAs each.</summary>
    [MethodImpl(MethodImplOptions.NoInlining)]
    public static double FmaRegisters256(int steps)
    {
        var c = Vector256.Create(0.999999);
        var d = Vector256.Create(1e-6);
        var a0 = Vector256.Create(0.1);
        var a1 = Vector256.Create(0.2);
        var a2 = Vector256.Create(0.3);
        var a3 = Vector256.Create(0.4);
        var a4 = Vector256.Create(0.5);
        var a5 = Vector256.Create(0.6);
        var a6 = Vector256.Create(0.7);
        var a7 = Vector256.Create(0.8);
        var a8 = Vector256.Create(0.9);
        var a9 = Vector256.Create(1.0);
        var a10 = Vector256.Create(1.1);
        var a11 = Vector256.Create(1.2);
        for (int s = 0; s < steps; s++)
        {
            a0 = Fma256(a0, c, d);
            a1 = Fma256(a1, c, d);
            a2 = Fma256(a2, c, d);
            a3 = Fma256(a3, c, d);
            a4 = Fma256(a4, c, d);
            a5 = Fma256(a5, c, d);
            a6 = Fma256(a6, c, d);
            a7 = Fma256(a7, c, d);
            a8 = Fma256(a8, c, d);
            a9 = Fma256(a9, c, d);
            a10 = Fma256(a10, c, d);
            a11 = Fma256(a11, c, d);
        }

        var sum = ((a0 + a1) + (a2 + a3)) + ((a4 + a5) + (a6 + a7)) + ((a8 + a9) + (a10 + a11));
        return Vector256.Sum(sum);
    }

    /// <summary>y = M x for row-major M with exactly 12 columns.</summary>
    [MethodImpl(MethodImplOptions.NoInlining)]
    public static void MatVec12(ReadOnlySpan<double> m, ReadOnlySpan<double> x, Span<double> y)
    {
        if (x.Length != 12 || m.Length != 12 * y.Length)
        {
            throw new ArgumentException("M must be rows × 12 and x of length 12");
        }

        ref double mr = ref MemoryMarshal.GetReference(m);
        ref double xr = ref MemoryMarshal.GetReference(x);
        var x0 = Vector256.LoadUnsafe(ref xr, 0);
        var x1 = Vector256.LoadUnsafe(ref xr, 4);
        var x2 = Vector256.LoadUnsafe(ref xr, 8);
        for (int i = 0; i < y.Length; i++)
        {
            nuint at = (nuint)(12 * i);
            var acc = Fma256(Vector256.LoadUnsafe(ref mr, at + 8), x2, Fma256(Vector256.LoadUnsafe(ref mr, at + 4), x1, Vector256.LoadUnsafe(ref mr, at) * x0));
            y[i] = Vector256.Sum(acc);
        }
    }
}
