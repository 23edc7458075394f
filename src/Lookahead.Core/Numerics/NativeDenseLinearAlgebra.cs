using System.Runtime.InteropServices;

namespace Lookahead.Core.Numerics;

/// <summary>
/// <see cref="DenseLinearAlgebra"/> on the system's OpenBLAS (<c>libopenblas.so.0</c>, Debian package
/// <c>libopenblas0</c>), called directly through function pointers looked up once: CBLAS for the products and
/// triangular kernels, the bundled LAPACK for <c>dpotrf</c> and <c>dsyev</c>. OpenBLAS is told to use one thread
/// per call when it is loaded, because requests already run in parallel and a kernel fanning out over every core
/// per call only makes them wait for each other.
/// </summary>
internal sealed unsafe class NativeDenseLinearAlgebra : DenseLinearAlgebra
{
    private const string Library = "libopenblas.so.0";

    // CBLAS enumeration values (cblas.h).
    private const int ColumnMajor = 102;
    private const int NoTrans = 111;
    private const int Trans = 112;
    private const int Lower = 122;
    private const int Left = 141;
    private const int NonUnit = 131;

    private readonly delegate* unmanaged<int, int, int, int, int, int, double, double*, int, double*, int, double, double*, int, void> dgemm;
    private readonly delegate* unmanaged<int, int, int, int, int, int, int, double, double*, int, double*, int, void> dtrsm;
    private readonly delegate* unmanaged<int, int, int, int, int, double*, int, double*, int, void> dtrmv;
    private readonly delegate* unmanaged<int, int, int, int, int, double*, int, double*, int, void> dtrsv;

    // Fortran LAPACK: every argument by reference, then the hidden lengths of the character arguments.
    private readonly delegate* unmanaged<byte*, int*, double*, int*, int*, nuint, void> dpotrf;
    private readonly delegate* unmanaged<byte*, byte*, int*, double*, int*, double*, double*, int*, int*, nuint, nuint, void> dsyev;

    private NativeDenseLinearAlgebra(nint handle)
    {
        dgemm = (delegate* unmanaged<int, int, int, int, int, int, double, double*, int, double*, int, double, double*, int, void>)NativeLibrary.GetExport(handle, "cblas_dgemm");
        dtrsm = (delegate* unmanaged<int, int, int, int, int, int, int, double, double*, int, double*, int, void>)NativeLibrary.GetExport(handle, "cblas_dtrsm");
        dtrmv = (delegate* unmanaged<int, int, int, int, int, double*, int, double*, int, void>)NativeLibrary.GetExport(handle, "cblas_dtrmv");
        dtrsv = (delegate* unmanaged<int, int, int, int, int, double*, int, double*, int, void>)NativeLibrary.GetExport(handle, "cblas_dtrsv");
        dpotrf = (delegate* unmanaged<byte*, int*, double*, int*, int*, nuint, void>)NativeLibrary.GetExport(handle, "dpotrf_");
        dsyev = (delegate* unmanaged<byte*, byte*, int*, double*, int*, double*, double*, int*, int*, nuint, nuint, void>)NativeLibrary.GetExport(handle, "dsyev_");
        var setThreads = (delegate* unmanaged<int, void>)NativeLibrary.GetExport(handle, "openblas_set_num_threads");
        setThreads(1);
    }

    public override string Name => "OpenBLAS";

    /// <summary>The library with every entry point found, or null (then compiling uses the managed kernels).</summary>
    public static NativeDenseLinearAlgebra? TryLoad()
    {
        if (!NativeLibrary.TryLoad(Library, out nint handle))
        {
            return null;
        }

        try
        {
            return new NativeDenseLinearAlgebra(handle);
        }
        catch (EntryPointNotFoundException)
        {
            // Another library under that name (or a build without LAPACK): the managed kernels serve instead.
            return null;
        }
    }

    protected override void MultiplyCore(
        bool transposeA, bool transposeB, int rows, int columns, int inner, double alpha,
        ReadOnlySpan<double> a, int lda, ReadOnlySpan<double> b, int ldb, double beta, Span<double> c, int ldc)
    {
        if (inner == 0)
        {
            // BLAS leaves C untouched when α·op(A)·op(B) is empty only for β = 1; make β = 0 mean "not read" here too.
            ScaleColumns(rows, columns, beta, c, ldc);
            return;
        }

        fixed (double* pa = a, pb = b, pc = c)
        {
            dgemm(ColumnMajor, transposeA ? Trans : NoTrans, transposeB ? Trans : NoTrans, rows, columns, inner, alpha, pa, lda, pb, ldb, beta, pc, ldc);
        }
    }

    protected override bool CholeskyLowerCore(Span<double> a, int n, int lda)
    {
        byte uplo = (byte)'L';
        int order = n;
        int leading = lda;
        int info = 0;
        fixed (double* pa = a)
        {
            dpotrf(&uplo, &order, pa, &leading, &info, 1);
        }

        if (info < 0)
        {
            throw new ArgumentException($"dpotrf rejected argument {-info}");
        }

        return info == 0;
    }

    protected override void SolveLowerCore(bool transpose, int n, int columns, ReadOnlySpan<double> l, int ldl, Span<double> b, int ldb)
    {
        fixed (double* pl = l, pb = b)
        {
            dtrsm(ColumnMajor, Left, Lower, transpose ? Trans : NoTrans, NonUnit, n, columns, 1.0, pl, ldl, pb, ldb);
        }
    }

    protected override void MultiplyLowerVectorCore(bool transpose, int n, ReadOnlySpan<double> l, int ldl, Span<double> x)
    {
        fixed (double* pl = l, px = x)
        {
            dtrmv(ColumnMajor, Lower, transpose ? Trans : NoTrans, NonUnit, n, pl, ldl, px, 1);
        }
    }

    protected override void SolveLowerVectorCore(bool transpose, int n, ReadOnlySpan<double> l, int ldl, Span<double> x)
    {
        fixed (double* pl = l, px = x)
        {
            dtrsv(ColumnMajor, Lower, transpose ? Trans : NoTrans, NonUnit, n, pl, ldl, px, 1);
        }
    }

    protected override double[] SymmetricEigenvaluesCore(Span<double> a, int n, int lda)
    {
        byte jobz = (byte)'N';
        byte uplo = (byte)'L';
        int order = n;
        int leading = lda;
        int info = 0;
        var values = new double[n];
        fixed (double* pa = a, pw = values)
        {
            // Workspace query first: the blocked tridiagonal reduction needs more than the minimum 3n − 1.
            double optimal = 0;
            int query = -1;
            dsyev(&jobz, &uplo, &order, pa, &leading, pw, &optimal, &query, &info, 1, 1);
            int size = Math.Max(3 * n, (int)optimal);
            var work = new double[size];
            fixed (double* pwork = work)
            {
                dsyev(&jobz, &uplo, &order, pa, &leading, pw, pwork, &size, &info, 1, 1);
            }
        }

        if (info < 0)
        {
            throw new ArgumentException($"dsyev rejected argument {-info}");
        }

        if (info > 0)
        {
            throw new NumericScaleException("the symmetric eigenvalue iteration did not converge");
        }

        return values;
    }
}
