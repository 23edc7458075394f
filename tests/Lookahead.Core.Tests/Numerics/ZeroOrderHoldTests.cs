using Lookahead.Core.Numerics;
using Lookahead.Core.Tests.Support;
using MathNet.Numerics.LinearAlgebra;
using Xunit;

namespace Lookahead.Core.Tests.Numerics;

public class ZeroOrderHoldTests
{
    public static IEnumerable<object[]> Cases => Fixtures.CaseNames("zoh.json");

    private static Matrix<double> M(double[,] values) => Matrix<double>.Build.DenseOfArray(values);

    // Textbook closed form (common practice): the double integrator x'' = u held over T gives
    // Φ = [[1, T], [0, 1]], Γ = [T²/2, T].
    [Theory]
    [InlineData(0.1)]
    [InlineData(1.0)]
    [InlineData(7.5)]
    public void DoubleIntegratorMatchesClosedForm(double t)
    {
        var (ad, bd) = ZeroOrderHold.Discretise(M(new double[,] { { 0, 1 }, { 0, 0 } }), M(new double[,] { { 0 }, { 1 } }), t);
        Assertions.Close(new[] { new[] { 1, t }, new[] { 0, 1.0 } }, ad, 1e-12);
        Assertions.Close(new[] { new[] { t * t / 2 }, new[] { t } }, bd, 1e-12);
    }

    // Textbook closed form (common practice): the first-order lag 1/(s+1) gives Φ = e^{−T}, Γ = 1 − e^{−T}.
    [Theory]
    [InlineData(0.01)]
    [InlineData(0.5)]
    [InlineData(3.0)]
    public void FirstOrderLagMatchesClosedForm(double t)
    {
        var (ad, bd) = ZeroOrderHold.Discretise(M(new double[,] { { -1 } }), M(new double[,] { { 1 } }), t);
        Assertions.CloseScalar(Math.Exp(-t), ad[0, 0], 1e-14);
        Assertions.CloseScalar(1 - Math.Exp(-t), bd[0, 0], 1e-12);
    }

    // Source: scipy.signal.cont2discrete(method='zoh') (SciPy 1.10.1), fixtures/zoh.json.
    [Theory]
    [MemberData(nameof(Cases))]
    public void MatchesScipyContToDiscrete(string name)
    {
        var c = Fixtures.Case("zoh.json", name);
        var (ad, bd) = ZeroOrderHold.Discretise(
            Matrix<double>.Build.DenseOfRowArrays(c.GetProperty("a").Matrix()),
            Matrix<double>.Build.DenseOfRowArrays(c.GetProperty("b").Matrix()),
            c.GetProperty("sampleTime").GetDouble());
        Assertions.Close(c.GetProperty("ad").Matrix(), ad, 1e-12, name + ".ad");
        Assertions.Close(c.GetProperty("bd").Matrix(), bd, 1e-12, name + ".bd");
    }

    [Theory]
    [InlineData(0.0)]
    [InlineData(-1.0)]
    [InlineData(double.NaN)]
    public void RefusesNonPositiveSampleTime(double t) =>
        Assert.Throws<ArgumentOutOfRangeException>(() => ZeroOrderHold.Discretise(M(new double[,] { { -1 } }), M(new double[,] { { 1 } }), t));
}
