using Lookahead.Core.Optimization;
using Lookahead.Core.Tests.Support;
using MathNet.Numerics.LinearAlgebra;
using Xunit;

namespace Lookahead.Core.Tests.Optimization;

/// <summary>
/// Published small convex QPs through the general solver entry point. Problem data and optimal values:
/// Hock &amp; Schittkowski (1981), Springer; Schittkowski (1987), Springer (problem 268); Maros &amp; Mészáros (1999),
/// Optim. Methods Softw. 11–12 — written down from memory, so each is cross-checked: CVXOPT 1.3.0 reaches the
/// same optimum on our copy of each problem (tests/reference/qp_problems.py), and here every solution must also pass KKT.
/// </summary>
public class PublishedQpProblemTests
{
    public static IEnumerable<object[]> Cases => Fixtures.CaseNames("qp_problems.json");

    /// <summary>Every case in both forms of the dual active-set method (the range-space form only serves programs without equalities).</summary>
    public static IEnumerable<object[]> CasesInBothForms => Cases.SelectMany(c => new[] { new object[] { c[0], false }, new object[] { c[0], true } });

    [Theory]
    [MemberData(nameof(CasesInBothForms))]
    public void ReachesThePublishedOptimum(string name, bool rangeSpace)
    {
        var c = Fixtures.Case("qp_problems.json", name);
        var g = c.GetProperty("g").Matrix();
        var a = c.GetProperty("a").Vector();
        var eq = c.GetProperty("eq");
        var ineq = c.GetProperty("ineq");
        var solution = QuadraticProgram.Solve(g, a, eq.GetProperty("matrix").Matrix(), eq.GetProperty("rhs").Vector(), ineq.GetProperty("matrix").Matrix(), ineq.GetProperty("rhs").Vector(), rangeSpace: rangeSpace);
        Assert.Equal(QpStatus.Optimal, solution.Status);

        double constant = c.GetProperty("constant").GetDouble();
        double objective = solution.Objective + constant;
        var published = c.GetProperty("publishedOptimum");
        double expected = published.ValueKind == System.Text.Json.JsonValueKind.Number ? published.GetDouble() : c.GetProperty("analyticOptimum").GetDouble();
        // Relative 1e-6 (published tables carry about seven digits); absolute 1e-6 for f* = 0, scaled by the constant
        // that the objective cancels against (HS268: 14319).
        double allowed = 1e-6 * Math.Max(Math.Max(1.0, Math.Abs(expected)), expected == 0 ? Math.Abs(constant) * 1e-3 : 0);
        Assert.True(Math.Abs(objective - expected) <= allowed, $"{name}: objective {objective:R}, published {expected:R}");

        // Independent optimality check of our own answer.
        var gm = Matrix<double>.Build.DenseOfRowArrays(g);
        var gradient = (gm * Vector<double>.Build.DenseOfArray(solution.X) + Vector<double>.Build.DenseOfArray(a)).ToArray();
        var rows = eq.GetProperty("matrix").Matrix().Concat(ineq.GetProperty("matrix").Matrix()).Select(r => (IReadOnlyList<(int, double)>)r.Select((v, j) => (j, v)).ToArray()).ToList();
        double[] rhs = [.. eq.GetProperty("rhs").Vector(), .. ineq.GetProperty("rhs").Vector()];
        Kkt.Check(gradient, new SparseRows(a.Length, rows), rhs, eq.GetProperty("rhs").GetArrayLength(), solution.X, 1e-7, name);
    }

    // Goldfarb & Idnani's method must detect contradictory constraints rather than return a point.
    [Theory]
    [InlineData(false)]
    [InlineData(true)]
    public void ReportsInfeasibleConstraints(bool rangeSpace)
    {
        var solution = QuadraticProgram.Solve([[1.0, 0.0], [0.0, 1.0]], [0.0, 0.0], [], [], [[1.0, 0.0], [-1.0, 0.0]], [1.0, 0.0], rangeSpace: rangeSpace);
        Assert.Equal(QpStatus.Infeasible, solution.Status);
    }

    [Fact]
    public void ReportsInconsistentEqualities()
    {
        var solution = QuadraticProgram.Solve([[1.0, 0.0], [0.0, 1.0]], [0.0, 0.0], [[1.0, 1.0], [2.0, 2.0]], [1.0, 3.0], [], []);
        Assert.Equal(QpStatus.Infeasible, solution.Status);
    }

    [Theory]
    [InlineData(false)]
    [InlineData(true)]
    public void RespectsTheIterationCap(bool rangeSpace)
    {
        var solution = QuadraticProgram.Solve([[1.0, 0.0], [0.0, 1.0]], [0.0, 0.0], [], [], [[1.0, 0.0], [0.0, 1.0]], [1.0, 2.0], maxIterations: 1, rangeSpace: rangeSpace); // two constraints to add, one allowed
        Assert.Equal(QpStatus.IterationLimit, solution.Status);
    }
}
