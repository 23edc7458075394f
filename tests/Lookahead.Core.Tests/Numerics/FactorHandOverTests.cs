using Lookahead.Core.Numerics;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using MathNet.Numerics.LinearAlgebra;
using Xunit;

namespace Lookahead.Core.Tests.Numerics;

/// <summary>
/// What the compiler keeps of a factorisation done by the dense kernels: the factor handed to
/// <see cref="CholeskyFactor"/> through <see cref="ComputedCholesky"/>, the Hessian represented by its factor
/// (<see cref="FactoredSymmetricMatrix"/>), and the condition number from the working arrays.
/// </summary>
public class FactorHandOverTests
{
    private static (Matrix<double> H, double[] Lower) Factored(int seed, int n)
    {
        var h = DenseCondensedReference.RandomSpd(new Random(seed), n, 0.5);
        var lower = h.ToColumnMajorArray();
        Assert.True(DenseLinearAlgebra.Default.CholeskyLower(lower, n, n));
        return (h, lower);
    }

    // The hand-over reads the lower triangle only: whatever the strict upper triangle holds, CholeskyFactor gets L.
    [Fact]
    public void HandedOverFactorIsTheLowerTriangleAndSolves()
    {
        int n = 30;
        var (h, lower) = Factored(1, n);
        var factor = new CholeskyFactor(ComputedCholesky.WrapLower(lower, n));
        var expected = h.Cholesky().Factor;   // MathNet 5.0.0's own factor of the same matrix
        for (int i = 0; i < n; i++)
        {
            for (int j = 0; j < n; j++)
            {
                Assertions.CloseScalar(expected[i, j], factor.Lower[(i * n) + j], 1e-13, $"L[{i},{j}]");
            }
        }

        var b = TestModels.RandomVector(new Random(2), n);
        var x = (double[])b.Clone();
        factor.Solve(x);
        Assertions.Close(b, (h * Vector<double>.Build.DenseOfArray(x)).ToArray(), 1e-12, "H·H⁻¹b");

        var wrapped = ComputedCholesky.WrapLower(lower, n);
        var solved = wrapped.Solve(Vector<double>.Build.DenseOfArray(b));
        Assertions.Close(b, (h * solved).ToArray(), 1e-12, "the wrapper's own solve");
        Assert.Throws<NotSupportedException>(() => wrapped.Factorize(h));
    }

    [Fact]
    public void HessianFromItsFactorHasTheEntriesAndProductsOfTheMatrix()
    {
        int n = 40;
        var (h, lower) = Factored(3, n);
        var implicitHessian = new FactoredSymmetricMatrix(new CholeskyFactor(ComputedCholesky.WrapLower(lower, n)));
        Assert.Equal(n, implicitHessian.RowCount);
        Assertions.Close(h.ToRowArrays(), implicitHessian.ToRowArrays(), 1e-13, "entries");
        var v = Vector<double>.Build.DenseOfArray(TestModels.RandomVector(new Random(4), n));
        Assertions.Close((h * v).ToArray(), (implicitHessian * v).ToArray(), 1e-13, "H·v");
        Assertions.Close((h.Transpose() * v).ToArray(), implicitHessian.TransposeThisAndMultiply(v).ToArray(), 1e-13, "Hᵀ·v");
        Assert.Throws<NotSupportedException>(() => implicitHessian[0, 0] = 1);
    }

    // The compiler's estimate from its arrays equals the estimate from the matrix and its MathNet factor, on both
    // sides of the exact-eigenvalue bound. Spectrum 1 … 10⁴ with isolated ends, so power iteration converges.
    [Theory]
    [InlineData(50)]
    [InlineData(HessianCondition.ExactUpTo + 20)]
    public void ConditionFromTheWorkingArraysMatchesTheMatrixPath(int n)
    {
        var random = new Random(n);
        var diagonal = Enumerable.Range(0, n).Select(i => i == 0 ? 1.0 : i == n - 1 ? 1e4 : 3 + (random.NextDouble() * 1e3)).ToArray();
        var u = TestModels.RandomVector(random, n);
        double uu = u.Sum(x => x * x);
        var q = Matrix<double>.Build.Dense(n, n, (i, j) => (i == j ? 1 : 0) - (2 * u[i] * u[j] / uu));
        var h = q * Matrix<double>.Build.DenseOfDiagonalArray(diagonal) * q;
        h = (h + h.Transpose()) * 0.5;
        double expected = HessianCondition.Compute(h, new CholeskyFactor(h));
        Assertions.CloseScalar(1e4, expected, 1e-5, "the matrix path on a known spectrum");

        foreach (var algebra in new[] { DenseLinearAlgebra.Managed, DenseLinearAlgebra.Default })
        {
            var lower = h.ToColumnMajorArray();
            double[]? exact = n <= HessianCondition.ExactUpTo ? (double[])lower.Clone() : null;
            Assert.True(algebra.CholeskyLower(lower, n, n));
            Assertions.CloseScalar(expected, HessianCondition.Compute(algebra, n, exact, lower), 1e-9, $"{algebra.Name}, n = {n}");
        }
    }
}
