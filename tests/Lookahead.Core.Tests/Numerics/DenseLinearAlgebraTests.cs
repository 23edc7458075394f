using Lookahead.Core.Numerics;
using Lookahead.Core.Tests.Support;
using Xunit;

namespace Lookahead.Core.Tests.Numerics;

/// <summary>
/// The compile kernels against entry-by-entry loops written here from their definitions (common practice), for
/// every implementation present on the machine: the managed one always, OpenBLAS where <c>libopenblas0</c> is
/// installed (CI installs it). Shapes cross the managed kernels' tile and block edges, and sub-matrices are passed
/// with leading dimensions larger than their rows and at offsets, as the compiler passes them.
/// </summary>
public class DenseLinearAlgebraTests
{
    public static TheoryData<string> Implementations()
    {
        var data = new TheoryData<string> { DenseLinearAlgebra.Managed.Name };
        if (DenseLinearAlgebra.Native is { } native)
        {
            data.Add(native.Name);
        }

        return data;
    }

    /// <summary>The implementation a theory row names.</summary>
    internal static DenseLinearAlgebra Named(string name) =>
        name == DenseLinearAlgebra.Managed.Name ? DenseLinearAlgebra.Managed : DenseLinearAlgebra.Native!;

    [Theory]
    [MemberData(nameof(Implementations))]
    public void ProductsMatchTheirDefinitionForEveryTransposeAndShape(string implementation)
    {
        var la = Named(implementation);
        var random = new Random(7);
        int[][] shapes = [[1, 1, 1], [3, 5, 2], [13, 7, 29], [17, 9, 300], [40, 33, 257], [9, 4, 0]];
        foreach (var shape in shapes)
        {
            int rows = shape[0], columns = shape[1], inner = shape[2];
            foreach (bool ta in new[] { false, true })
            {
                foreach (bool tb in new[] { false, true })
                {
                    // Operands live inside larger arrays: leading dimension + 3 and an offset of 5 entries.
                    int aRows = ta ? inner : rows, aCols = ta ? rows : inner;
                    int bRows = tb ? columns : inner, bCols = tb ? inner : columns;
                    int lda = aRows + 3, ldb = bRows + 3, ldc = rows + 3;
                    var a = TestModels.RandomVector(random, 5 + (lda * Math.Max(1, aCols)));
                    var b = TestModels.RandomVector(random, 5 + (ldb * Math.Max(1, bCols)));
                    var c = TestModels.RandomVector(random, 5 + (ldc * columns));
                    var expected = (double[])c.Clone();
                    double alpha = -1.5, beta = 0.25;
                    for (int j = 0; j < columns; j++)
                    {
                        for (int i = 0; i < rows; i++)
                        {
                            double sum = 0;
                            for (int l = 0; l < inner; l++)
                            {
                                double x = ta ? a[5 + l + (i * lda)] : a[5 + i + (l * lda)];
                                double y = tb ? b[5 + j + (l * ldb)] : b[5 + l + (j * ldb)];
                                sum += x * y;
                            }

                            expected[5 + i + (j * ldc)] = (alpha * sum) + (beta * c[5 + i + (j * ldc)]);
                        }
                    }

                    la.Multiply(ta, tb, rows, columns, inner, alpha, a.AsSpan(5), lda, b.AsSpan(5), ldb, beta, c.AsSpan(5), ldc);
                    Assertions.Close(expected, c, 1e-13, $"{implementation} {rows}×{columns}×{inner} transposes {ta}/{tb}");
                }
            }
        }
    }

    // With β = 0 the destination is overwritten, not scaled: NaN there must not leak into the product.
    [Theory]
    [MemberData(nameof(Implementations))]
    public void ProductWithZeroBetaDoesNotReadTheDestination(string implementation)
    {
        var la = Named(implementation);
        var a = new double[] { 1, 2, 3, 4 };
        var b = new double[] { 1, 0, 0, 1 };
        var c = new double[] { double.NaN, double.NaN, double.NaN, double.NaN };
        la.Multiply(false, false, 2, 2, 2, 1.0, a, 2, b, 2, 0.0, c, 2);
        Assert.Equal(a, c);
    }

    [Theory]
    [MemberData(nameof(Implementations))]
    public void CholeskyReproducesTheMatrixAndLeavesTheUpperTriangleAlone(string implementation)
    {
        var la = Named(implementation);
        var random = new Random(11);
        foreach (int n in new[] { 1, 5, 64, 65, 150 })
        {
            var h = RandomSpd(random, n);
            var work = (double[])h.Clone();
            for (int j = 1; j < n; j++)
            {
                for (int i = 0; i < j; i++)
                {
                    work[i + (j * n)] = 1000 + i + (j * n);   // a sentinel in the strict upper triangle
                }
            }

            Assert.True(la.CholeskyLower(work, n, n));
            var product = new double[n * n];
            for (int j = 0; j < n; j++)
            {
                for (int i = 0; i < n; i++)
                {
                    double sum = 0;
                    for (int k = 0; k <= Math.Min(i, j); k++)
                    {
                        sum += work[i + (k * n)] * work[j + (k * n)];
                    }

                    product[i + (j * n)] = sum;
                }
            }

            Assertions.Close(h, product, 1e-13, $"{implementation} LLᵀ, n = {n}");
            for (int j = 1; j < n; j++)
            {
                for (int i = 0; i < j; i++)
                {
                    Assert.Equal(1000 + i + (j * n), work[i + (j * n)]);
                }
            }
        }
    }

    [Theory]
    [MemberData(nameof(Implementations))]
    public void CholeskyReportsAMatrixThatIsNotPositiveDefinite(string implementation)
    {
        var la = Named(implementation);
        var random = new Random(3);
        int n = 70;
        var h = RandomSpd(random, n);
        h[60 + (60 * n)] = -1;  // a negative diagonal entry: no Cholesky factor exists
        Assert.False(la.CholeskyLower(h, n, n));
    }

    [Theory]
    [MemberData(nameof(Implementations))]
    public void TriangularSolvesAndProductsInvertEachOther(string implementation)
    {
        var la = Named(implementation);
        var random = new Random(5);
        foreach (int n in new[] { 1, 7, 64, 130 })
        {
            var l = RandomSpd(random, n);
            Assert.True(la.CholeskyLower(l, n, n));
            foreach (bool transpose in new[] { false, true })
            {
                int columns = 9;
                int ldb = n + 2;
                var b = TestModels.RandomVector(random, ldb * columns);
                var x = (double[])b.Clone();
                la.SolveLower(transpose, n, columns, l, n, x, ldb);

                // op(L)·x by its definition must give b back, column by column.
                for (int j = 0; j < columns; j++)
                {
                    var column = x.AsSpan(j * ldb, n).ToArray();
                    var back = TriangularProduct(l, n, transpose, column);
                    Assertions.Close(b.AsSpan(j * ldb, n).ToArray(), back, 1e-11, $"{implementation} solve transpose={transpose} n={n} column {j}");
                }

                var v = TestModels.RandomVector(random, n);
                var w = (double[])v.Clone();
                la.MultiplyLowerVector(transpose, n, l, n, w);
                Assertions.Close(TriangularProduct(l, n, transpose, v), w, 1e-13, $"{implementation} product transpose={transpose} n={n}");
                la.SolveLowerVector(transpose, n, l, n, w);
                Assertions.Close(v, w, 1e-11, $"{implementation} vector solve transpose={transpose} n={n}");
            }
        }
    }

    // Q·diag(λ)·Qᵀ with Q a Householder reflection (exactly orthogonal in exact arithmetic): eigenvalues λ.
    [Theory]
    [MemberData(nameof(Implementations))]
    public void SymmetricEigenvaluesOfAKnownSpectrum(string implementation)
    {
        var la = Named(implementation);
        var random = new Random(9);
        int n = 40;
        var lambda = Enumerable.Range(0, n).Select(i => Math.Pow(10, -3 + (6.0 * i / (n - 1)))).ToArray();
        var u = TestModels.RandomVector(random, n);
        double uu = u.Sum(x => x * x);
        var a = new double[n * n];
        for (int j = 0; j < n; j++)
        {
            for (int i = 0; i < n; i++)
            {
                double sum = 0;
                for (int k = 0; k < n; k++)
                {
                    double qik = (i == k ? 1 : 0) - (2 * u[i] * u[k] / uu);
                    double qjk = (j == k ? 1 : 0) - (2 * u[j] * u[k] / uu);
                    sum += qik * lambda[k] * qjk;
                }

                a[i + (j * n)] = sum;
            }
        }

        var values = la.SymmetricEigenvalues(a, n, n).Order().ToArray();
        Assertions.Close(lambda, values, 1e-12, $"{implementation} eigenvalues");
    }

    [Theory]
    [MemberData(nameof(Implementations))]
    public void ShortSpansAreRefusedBeforeAnyWork(string implementation)
    {
        var la = Named(implementation);
        var a = new double[6];
        Assert.Throws<ArgumentException>(() => la.Multiply(false, false, 3, 3, 3, 1, a, 3, new double[9], 3, 0, new double[9], 3));
        Assert.Throws<ArgumentException>(() => la.CholeskyLower(new double[8], 3, 3));
        Assert.Throws<ArgumentException>(() => la.SolveLower(false, 3, 2, new double[9], 2, new double[6], 3));
    }

    /// <summary>op(L)·x with L the lower triangle of the column-major array.</summary>
    private static double[] TriangularProduct(double[] l, int n, bool transpose, double[] x)
    {
        var y = new double[n];
        for (int i = 0; i < n; i++)
        {
            for (int k = 0; k < n; k++)
            {
                double entry = transpose ? (k >= i ? l[k + (i * n)] : 0) : (k <= i ? l[i + (k * n)] : 0);
                y[i] += entry * x[k];
            }
        }

        return y;
    }

    /// <summary>MᵀM + n·I for a random M, column-major: symmetric and comfortably positive definite.</summary>
    internal static double[] RandomSpd(Random random, int n)
    {
        var m = TestModels.RandomVector(random, n * n);
        var h = new double[n * n];
        for (int j = 0; j < n; j++)
        {
            for (int i = 0; i <= j; i++)
            {
                double sum = 0;
                for (int k = 0; k < n; k++)
                {
                    sum += m[k + (i * n)] * m[k + (j * n)];
                }

                h[i + (j * n)] = sum + (i == j ? n : 0);
                h[j + (i * n)] = h[i + (j * n)];
            }
        }

        return h;
    }
}
