using System.Text.Json;
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

    // Source for the published cases below: SciPy's own discrete-time Riccati test,
    // scipy/linalg/tests/test_solvers.py (SciPy 1.10.1, test_solve_discrete_are), read into
    // fixtures/dare.json "published" by tests/reference/generate_fixtures.py: its cases (mostly the darex examples of
    // Benner, Laub & Mehrmann 1995) and its per-case residual tolerance min_decimal.
    public static IEnumerable<object[]> PublishedCases =>
        Published().Select(c => new object[] { c.GetProperty("name").GetString()! });

    public static IEnumerable<object[]> PublishedCasesWithScipyAnswer =>
        Published().Where(c => c.TryGetProperty("p", out _)).Select(c => new object[] { c.GetProperty("name").GetString()! });

    private static IEnumerable<JsonElement> Published() =>
        Fixtures.Load("dare.json").GetProperty("published").GetProperty("cases").EnumerateArray();

    private static JsonElement PublishedCase(string name) =>
        Published().Single(c => c.GetProperty("name").GetString() == name);

    private static (Matrix<double> A, Matrix<double> B, Matrix<double> Q, Matrix<double> R) Data(JsonElement c) => (
        Matrix<double>.Build.DenseOfRowArrays(c.GetProperty("a").Matrix()),
        Matrix<double>.Build.DenseOfRowArrays(c.GetProperty("b").Matrix()),
        Matrix<double>.Build.DenseOfRowArrays(c.GetProperty("q").Matrix()),
        Matrix<double>.Build.DenseOfRowArrays(c.GetProperty("r").Matrix()));

    // SciPy's acceptance test for its own solver (scipy/linalg/tests/test_solvers.py, SciPy 1.10.1,
    // test_solve_discrete_are): every entry of AᵀPA − P + Q − AᵀPB(R + BᵀPB)⁻¹BᵀPA is below 1.5·10^−d in absolute
    // value (numpy's assert_array_almost_equal with decimal = d, the case's min_decimal). The residual and the
    // closed-loop spectral radius are computed here from P alone, not taken from the solver's report. Cases that
    // SciPy's test marks as known failures are held to the same bound.
    [Theory]
    [MemberData(nameof(PublishedCases))]
    public void MeetsScipysResidualBoundOnItsPublishedCases(string name)
    {
        var c = PublishedCase(name);
        var (a, b, q, r) = Data(c);
        int decimals = c.GetProperty("residualDecimal").GetInt32();
        var p = DiscreteRiccati.Solve(a, b, q, r).P;

        var lu = (r + b.TransposeThisAndMultiply(p * b)).LU();
        var gain = lu.Solve(b.TransposeThisAndMultiply(p * a));
        var residual = a.TransposeThisAndMultiply(p * a) - p + q - (a.TransposeThisAndMultiply(p * b) * gain);
        double worst = residual.Enumerate().Max(Math.Abs);
        Assert.True(worst < 1.5 * Math.Pow(10, -decimals), $"{name}: largest residual entry {worst:g3}, SciPy's bound 1.5e-{decimals}");

        double radius = (a - (b * gain)).Evd().EigenValues.Max(z => z.Magnitude);
        Assert.True(radius < 1, $"{name}: closed-loop spectral radius {radius:R}");
    }

    // Agreement with scipy.linalg.solve_discrete_are (SciPy 1.10.1) on the published cases SciPy's test expects it to
    // pass (fixtures/dare.json "published", source scipy/linalg/tests/test_solvers.py). SciPy's answer is trusted to
    // 1e-8 relative, or to its own residual bound 1.5·10^−d where that is looser (d < 8: darex #14, whose SciPy answer
    // is 2e-8 off the closed form checked below).
    [Theory]
    [MemberData(nameof(PublishedCasesWithScipyAnswer))]
    public void MatchesScipyOnItsPublishedCases(string name)
    {
        var c = PublishedCase(name);
        var (a, b, q, r) = Data(c);
        double tolerance = Math.Max(1e-8, 1.5 * Math.Pow(10, -c.GetProperty("residualDecimal").GetInt32()));
        var solution = DiscreteRiccati.Solve(a, b, q, r);
        Assertions.Close(c.GetProperty("p").Matrix(), solution.P, tolerance, name);
    }

    // darex #12 of the published cases (A = [[0, ε], [0, 0]], B = e₂, Q = I, R = 1; SciPy's test expects its own
    // solver to fail here). By hand: AᵀPB = 0 for any diagonal P, so the equation reduces to P = AᵀPA + Q, whose
    // solution is P = diag(1, 1 + ε²) with gain 0 and a nilpotent, hence stable, closed loop.
    [Fact]
    public void PublishedCaseWithLargeCouplingHasItsClosedForm()
    {
        var (a, b, q, r) = Data(PublishedCase("scipy-darex-12"));
        double epsilon = a[0, 1];
        Assert.True(a[0, 0] == 0 && a[1, 0] == 0 && a[1, 1] == 0 && b[0, 0] == 0 && b[1, 0] == 1, "the data no longer has the structure the closed form needs");
        Assert.True(q.Equals(Matrix<double>.Build.DenseIdentity(2)) && r[0, 0] == 1, "the data no longer has the weights the closed form needs");
        var p = DiscreteRiccati.Solve(a, b, q, r).P;
        Assertions.CloseScalar(1, p[0, 0], 1e-8, "P[0,0]");
        Assertions.CloseScalar(1 + (epsilon * epsilon), p[1, 1], 1e-8, "P[1,1]");
        Assert.True(Math.Abs(p[0, 1]) <= 1e-8 * Math.Sqrt(p[0, 0] * p[1, 1]), $"P[0,1] = {p[0, 1]:R}, expected 0");
    }

    // darex #14 of the published cases: x₁ ← a·x₁ + β·u feeds a chain of three delays and only the last state is
    // weighted (Q = e₄e₄ᵀ). By hand the cost splits into the three delayed states, each seen once, and a scalar problem
    // in x₁ with weight 1, so P = diag(p, 1, 1, 1) with p the positive root of β²p² + (R(1 − a²) − β²)p − R = 0
    // (as in ScalarClosedForm). SciPy's stored answer is off by about 2e-8 relative here, which is why its
    // comparison above is looser for this case.
    [Fact]
    public void PublishedCaseWithSlowModeHasItsClosedForm()
    {
        var (a, b, q, r) = Data(PublishedCase("scipy-darex-14"));
        var chain = Matrix<double>.Build.Dense(4, 4, (i, j) => i == j + 1 ? 1.0 : 0.0);
        chain[0, 0] = a[0, 0];
        var weight = Matrix<double>.Build.Dense(4, 4);
        weight[3, 3] = 1;
        Assert.True(a.Equals(chain) && q.Equals(weight) && b.Column(0).Skip(1).All(v => v == 0), "the data no longer has the structure the closed form needs");
        double decay = a[0, 0], beta = b[0, 0], inputWeight = r[0, 0];

        // 1 − a is exact in floating point for a in [½, 2], so 1 − a² = (1 − a)(1 + a) keeps every digit.
        double linear = (inputWeight * (1 - decay) * (1 + decay)) - (beta * beta);
        double scalar = (-linear + Math.Sqrt((linear * linear) + (4 * beta * beta * inputWeight))) / (2 * beta * beta);
        var expected = Matrix<double>.Build.DenseOfDiagonalArray([scalar, 1, 1, 1]);
        Assertions.Close(expected.ToRowArrays(), DiscreteRiccati.Solve(a, b, q, r).P, 1e-8, "darex #14");
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
