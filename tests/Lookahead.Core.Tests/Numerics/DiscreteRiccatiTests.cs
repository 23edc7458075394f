using Lookahead.Core.Numerics;
using Lookahead.Core.Tests.Support;
using MathNet.Numerics.LinearAlgebra;
using Xunit;

namespace Lookahead.Core.Tests.Numerics;

public class DiscreteRiccatiTests
{
    public static IEnumerable<object[]> Cases => Fixtures.CaseNames("dare.json");

    public static IEnumerable<object[]> Refused =>
        Fixtures.Load("dare.json").GetProperty("refused").EnumerateArray().Select(c => new object[] { c.GetProperty("name").GetString()! });

    private static Matrix<double> M(double[,] values) => Matrix<double>.Build.DenseOfArray(values);

    // Benner, Laub & Mehrmann (1995), discrete-time collection (example values from memory): for
    // A = [[4, 3], [−4.5, −3.5]], B = [1; −1], R = 1, Q = [[9, 6], [6, 4]] the solution is P = ((1 + √5)/2)·Q.
    [Fact]
    public void GoldenRatioBenchmarkExample()
    {
        var q = M(new double[,] { { 9, 6 }, { 6, 4 } });
        var solution = DiscreteRiccati.Solve(M(new double[,] { { 4, 3 }, { -4.5, -3.5 } }), M(new double[,] { { 1 }, { -1 } }), q, M(new double[,] { { 1 } }));
        Assertions.Close((q * ((1 + Math.Sqrt(5)) / 2)).ToRowArrays(), solution.P, 1e-10);
        Assert.True(solution.RelativeResidual <= 1e-10, $"residual {solution.RelativeResidual:g3}");
    }

    // Benner, Laub & Mehrmann (1995), scalable example with A the upper shift, B = e_n, Q = I, R = 1:
    // the solution is diag(1, 2, …, n) (from memory; it also follows by hand from the recursion).
    [Theory]
    [InlineData(2)]
    [InlineData(5)]
    [InlineData(20)]
    [InlineData(60)]
    public void ShiftBenchmarkGivesDiagonalOneToN(int n)
    {
        var a = Matrix<double>.Build.Dense(n, n, (i, j) => j == i + 1 ? 1.0 : 0.0);
        var b = Matrix<double>.Build.Dense(n, 1, (i, _) => i == n - 1 ? 1.0 : 0.0);
        var solution = DiscreteRiccati.Solve(a, b, Matrix<double>.Build.DenseIdentity(n), M(new double[,] { { 1 } }));
        var expected = Matrix<double>.Build.DenseOfDiagonalArray(Enumerable.Range(1, n).Select(i => (double)i).ToArray());
        Assertions.Close(expected.ToRowArrays(), solution.P, 1e-10);
        Assert.True(solution.RelativeResidual <= 1e-10);
    }

    // Closed form (common practice): for scalars the DARE is b²p² + (r − a²r − qb²)p − qr = 0; the stabilising root is the positive one.
    [Theory]
    [InlineData(0.5, 1.0, 1.0, 1.0)]
    [InlineData(1.0, 1.0, 1.0, 1.0)]
    [InlineData(3.0, 0.5, 2.0, 0.1)]
    [InlineData(-1.7, 2.0, 0.01, 5.0)]
    [InlineData(1.2, 1e-3, 1.0, 1.0)]
    public void ScalarClosedForm(double a, double b, double q, double r)
    {
        double linear = r - (a * a * r) - (q * b * b);
        double expected = (-linear + Math.Sqrt((linear * linear) + (4 * b * b * q * r))) / (2 * b * b);
        var solution = DiscreteRiccati.Solve(M(new[,] { { a } }), M(new[,] { { b } }), M(new[,] { { q } }), M(new[,] { { r } }));
        Assertions.CloseScalar(expected, solution.P[0, 0], 1e-10);
        Assert.True(solution.ClosedLoopSpectralRadius < 1);
    }

    // Source: scipy.linalg.solve_discrete_are (SciPy 1.10.1), fixtures/dare.json.
    [Theory]
    [MemberData(nameof(Cases))]
    public void MatchesScipySolveDiscreteAre(string name)
    {
        var c = Fixtures.Case("dare.json", name);
        var a = Matrix<double>.Build.DenseOfRowArrays(c.GetProperty("a").Matrix());
        var b = Matrix<double>.Build.DenseOfRowArrays(c.GetProperty("b").Matrix());
        var q = Matrix<double>.Build.DenseOfRowArrays(c.GetProperty("q").Matrix());
        var r = Matrix<double>.Build.DenseOfRowArrays(c.GetProperty("r").Matrix());
        var solution = DiscreteRiccati.Solve(a, b, q, r);
        Assertions.Close(c.GetProperty("p").Matrix(), solution.P, 1e-8, name);
        Assert.True(solution.RelativeResidual <= 1e-10, $"{name}: residual {solution.RelativeResidual:g3}");
        Assert.True(solution.ClosedLoopSpectralRadius < 1);
    }

    // Systems with no stabilising solution (fixtures/dare.json "refused"): the solver must say so, not return a number.
    [Theory]
    [MemberData(nameof(Refused))]
    public void RefusesWhenNoStabilisingSolution(string name)
    {
        var c = Fixtures.Load("dare.json").GetProperty("refused").EnumerateArray().Single(x => x.GetProperty("name").GetString() == name);
        Assert.Throws<RiccatiException>(() => DiscreteRiccati.Solve(
            Matrix<double>.Build.DenseOfRowArrays(c.GetProperty("a").Matrix()),
            Matrix<double>.Build.DenseOfRowArrays(c.GetProperty("b").Matrix()),
            Matrix<double>.Build.DenseOfRowArrays(c.GetProperty("q").Matrix()),
            Matrix<double>.Build.DenseOfRowArrays(c.GetProperty("r").Matrix())));
    }

    [Fact]
    public void RefusesUnreachableUnstableMode()
    {
        var ex = Assert.Throws<RiccatiException>(() => DiscreteRiccati.Solve(
            M(new double[,] { { 2, 0 }, { 0, 0.5 } }), M(new double[,] { { 0 }, { 1 } }), Matrix<double>.Build.DenseIdentity(2), M(new double[,] { { 1 } })));
        Assert.Contains("not stabilisable", ex.Message);
    }

    // An undamped oscillator that the weight does not see: the mode on the unit circle has no stabilising solution.
    [Fact]
    public void RefusesUnobservableModeOnUnitCircle()
    {
        double c = Math.Cos(0.3), s = Math.Sin(0.3);
        Assert.Throws<RiccatiException>(() => DiscreteRiccati.Solve(
            M(new[,] { { c, s }, { -s, c } }), M(new double[,] { { 0 }, { 1 } }), Matrix<double>.Build.Dense(2, 2), M(new double[,] { { 1 } })));
    }
}
