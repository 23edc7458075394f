using Lookahead.Core.Numerics;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using MathNet.Numerics.LinearAlgebra;
using Xunit;

namespace Lookahead.Core.Tests.Numerics;

/// <summary>
/// Each iterative step ends promptly on data at the edges of the double range, either with a correct result
/// or with its documented exception — never a hang, never NaN passed on.
/// </summary>
public class ExtremeScaleNumericsTests
{
    private static Matrix<double> M(double[,] values) => Matrix<double>.Build.DenseOfArray(values);

    // ‖M‖₁ = 1e308 would need about a thousand squarings that overflow anyway; the count is bounded up front.
    [Fact]
    public void MatrixExponentialRefusesANormBeyondItsSquaringBound()
    {
        var ex = Assert.Throws<ArgumentException>(() => Bounded.Run(() => MatrixExponential.Compute(M(new double[,] { { 1e308, 0 }, { 0, 1 } }))));
        Assert.Contains("squarings", ex.Message, StringComparison.Ordinal);
    }

    // e^800 is beyond the double range (about e^709.8): overflow is reported, not returned as ∞.
    [Fact]
    public void MatrixExponentialReportsOverflowInsteadOfReturningInfinity()
    {
        var ex = Assert.Throws<ArgumentException>(() => Bounded.Run(() => MatrixExponential.Compute(M(new double[,] { { 800 } }))));
        Assert.Contains("overflow", ex.Message, StringComparison.Ordinal);
    }

    // Closed form (common practice): e^{−10⁶} underflows to 0; a stiff stable matrix is well inside the bound.
    [Fact]
    public void MatrixExponentialOfAStiffStableMatrixUnderflowsToZero()
    {
        var result = MatrixExponential.Compute(M(new double[,] { { -1e6, 0 }, { 0, -1 } }));
        Assert.Equal(0.0, result[0, 0]);
        // The 18 squarings the fast entry needs cost the slow one some digits (rounding grows like 2^s·ε).
        Assertions.CloseScalar(Math.Exp(-1), result[1, 1], 1e-9);
    }

    // Closed form (common practice): the first-order lag x' = −x + b·u gives Φ = e^{−T}, Γ = (1 − e^{−T})·b for any b.
    // B enters the hold linearly, so a huge b must not change Φ or the relative accuracy of Γ.
    [Theory]
    [InlineData(1.0)]
    [InlineData(1e200)]
    [InlineData(1e-200)]
    public void HoldOfAFirstOrderLagIsExactForAnyInputScale(double b)
    {
        var (ad, bd) = Bounded.Run(() => ZeroOrderHold.Discretise(M(new double[,] { { -1 } }), M(new double[,] { { b } }), 1.0));

        Assert.Equal(Math.Exp(-1), ad[0, 0], 12);
        Assertions.CloseScalar(1 - Math.Exp(-1), bd[0, 0] / b, 1e-12);
    }

    // A plant growing as e^{t} held for 800 s overflows; the sample time is named.
    [Fact]
    public void HoldThatOverflowsNamesTheSampleTime()
    {
        var ex = Assert.Throws<ArgumentException>(() => Bounded.Run(() => ZeroOrderHold.Discretise(M(new double[,] { { 1 } }), M(new double[,] { { 1 } }), 800)));
        Assert.Equal("sampleTime", ex.ParamName);
    }

    [Fact]
    public void HoldWithANormBeyondTheSquaringBoundNamesTheSampleTime()
    {
        var ex = Assert.Throws<ArgumentException>(() => Bounded.Run(() => ZeroOrderHold.Discretise(M(new double[,] { { -0.02 } }), M(new double[,] { { 1 } }), 1e300)));
        Assert.Equal("sampleTime", ex.ParamName);
    }

    // [A − λI, B] with B near 1e200: the rank test must not overflow its own norms (which left an SVD spinning).
    [Fact]
    public void StabilisabilityTestEndsForAHugeInputMatrix()
    {
        var result = Bounded.Run(() => SystemProperties.Stabilisable(M(new double[,] { { 1, 0.1 }, { 0, 1 } }), M(new double[,] { { 1e200 }, { 1e199 } })));
        Assert.True(result.Holds);
    }

    // rank [A − λI, B] = rank [A − λI, B·d] for d ≠ 0 (common practice): the answer must not depend on B's units.
    [Theory]
    [InlineData(1e-200)]
    [InlineData(1e-12)]
    [InlineData(1e200)]
    public void StabilisabilityDoesNotDependOnTheInputScale(double d)
    {
        var a = M(new double[,] { { 1.2, 0 }, { 0.1, 0.5 } });
        Assert.True(SystemProperties.Stabilisable(a, M(new double[,] { { 0.5 * d }, { 0 } })).Holds);
        Assert.False(SystemProperties.Stabilisable(a, M(new double[,] { { 0 }, { 0.5 * d } })).Holds);
    }

    [Fact]
    public void StabilisabilityTestEndsForAHugeStateMatrix() =>
        Bounded.Run(() => SystemProperties.Stabilisable(M(new double[,] { { 1e308, 0.1 }, { 0, 1 } }), M(new double[,] { { 0.005 }, { 0.1 } })));

    // Eigenvalues scale with the matrix: 1e300·diag(2, −3) has spectral radius 3e300.
    [Fact]
    public void SpectralRadiusOfAHugeMatrixIsScaledBack() =>
        Assertions.CloseScalar(3.0, Bounded.Run(() => SystemProperties.SpectralRadius(M(new double[,] { { 2e300, 1e300 }, { 0, -3e300 } }))) / 1e300, 1e-12);

    [Fact]
    public void ControllabilityRankOfAHugeStateMatrixIsStillComputed() =>
        Assert.Equal(2, Bounded.Run(() => SystemProperties.ControllabilityRank(M(new double[,] { { 1e308, 1e308 }, { 0, 1e308 } }), M(new double[,] { { 0 }, { 1 } }))));

    [Fact]
    public void EigenvaluesOfANonFiniteMatrixAreRefused() =>
        Assert.ThrowsAny<ArithmeticException>(() => Bounded.Run(() => SystemProperties.Eigenvalues(M(new double[,] { { double.NaN, 0 }, { 0, 1 } }))));

    // B near 1e200 makes B R⁻¹ Bᵀ overflow in the first doubling step: the solver stops and says so.
    [Fact]
    public void RiccatiDoublingReportsOverflowForAHugeInputMatrix()
    {
        var ex = Assert.Throws<RiccatiException>(() => Bounded.Run(() => DiscreteRiccati.Solve(
            M(new double[,] { { 1, 0.1 }, { 0, 1 } }), M(new double[,] { { 1e200 }, { 1e199 } }), Matrix<double>.Build.DenseIdentity(2), M(new double[,] { { 1 } }))));
        Assert.Contains("overflow", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void RiccatiDoublingReportsOverflowForAHugeStateWeight()
    {
        var ex = Assert.Throws<RiccatiException>(() => Bounded.Run(() => DiscreteRiccati.Solve(
            M(new double[,] { { 1, 0.1 }, { 0, 1 } }), M(new double[,] { { 0.005 }, { 0.1 } }), M(new double[,] { { 1e308, 0 }, { 0, 1 } }), M(new double[,] { { 1 } }))));
        Assert.Contains("overflow", ex.Message, StringComparison.Ordinal);
    }

    // The condition number is scale-free: 1e300·diag(1, 4) has condition 4, computed without overflow.
    [Fact]
    public void HessianConditionIsScaleFree()
    {
        var h = M(new double[,] { { 1e300, 0 }, { 0, 4e300 } });
        Assertions.CloseScalar(4.0, HessianCondition.Compute(h, new CholeskyFactor(h)), 1e-12);
    }

    [Fact]
    public void HessianConditionRefusesANonFiniteMatrix()
    {
        var h = M(new double[,] { { 1, 0 }, { 0, 1 } });
        var factor = new CholeskyFactor(h);
        h[0, 1] = double.NaN;
        h[1, 0] = double.NaN;
        Assert.ThrowsAny<ArithmeticException>(() => Bounded.Run(() => HessianCondition.Compute(h, factor)));
    }
}
