using Lookahead.Core.Numerics;
using Lookahead.Core.Tests.Support;
using MathNet.Numerics.LinearAlgebra;
using Xunit;

namespace Lookahead.Core.Tests.Numerics;

public class MatrixExponentialTests
{
    public static IEnumerable<object[]> Cases => Fixtures.CaseNames("expm.json");

    // Source: scipy.linalg.expm (SciPy 1.10.1), fixtures/expm.json written by tests/reference/generate_fixtures.py.
    [Theory]
    [MemberData(nameof(Cases))]
    public void MatchesScipyExpm(string name)
    {
        var c = Fixtures.Case("expm.json", name);
        var result = MatrixExponential.Compute(Matrix<double>.Build.DenseOfRowArrays(c.GetProperty("a").Matrix()));
        Assertions.Close(c.GetProperty("expm").Matrix(), result, 1e-12, name);
    }

    // Closed form (common practice): exp([[0, θ], [−θ, 0]]) is the rotation by θ.
    [Theory]
    [InlineData(0.3)]
    [InlineData(2.0)]
    [InlineData(40.0)]
    public void RotationGeneratorGivesRotation(double theta)
    {
        var result = MatrixExponential.Compute(Matrix<double>.Build.DenseOfArray(new[,] { { 0, theta }, { -theta, 0 } }));
        Assertions.Close(new[] { new[] { Math.Cos(theta), Math.Sin(theta) }, new[] { -Math.Sin(theta), Math.Cos(theta) } }, result, 1e-12 * Math.Max(1, theta));
    }

    // Higham (2005), Table 2.2: the [13/13] Padé numerator coefficients b_0 … b_13 (b_13 = 1), from memory.
    [Fact]
    public void PadeCoefficientsMatchPublishedDegree13Table()
    {
        double[] published = [64764752532480000, 32382376266240000, 7771770303897600, 1187353796428800, 129060195264000, 10559470521600, 670442572800, 33522128640, 1323241920, 40840800, 960960, 16380, 182, 1];
        var c = MatrixExponential.Coefficients(13);
        for (int j = 0; j <= 13; j++)
        {
            Assertions.CloseScalar(published[j] / published[0], c[j], 1e-14, $"b_{j}");
        }
    }

    [Fact]
    public void RefusesNonSquareAndNonFinite()
    {
        Assert.Throws<ArgumentException>(() => MatrixExponential.Compute(Matrix<double>.Build.Dense(2, 3)));
        Assert.Throws<ArgumentException>(() => MatrixExponential.Compute(Matrix<double>.Build.DenseOfArray(new[,] { { double.NaN } })));
    }
}
