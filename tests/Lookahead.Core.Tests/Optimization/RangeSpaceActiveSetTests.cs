using Lookahead.Core.Numerics;
using Lookahead.Core.Optimization;
using Lookahead.Core.Tests.Support;
using MathNet.Numerics.LinearAlgebra;
using Xunit;

namespace Lookahead.Core.Tests.Optimization;

/// <summary>
/// The range-space form of the dual active-set method against its J form (the same method, kept as J = L⁻ᵀQ) on
/// random programs shaped like limited plans — bounds, two-entry rate rows, dense output rows, rows repeated or
/// implied by others, rows switched off — and against the KKT conditions checked independently (<see cref="Kkt"/>).
/// Both are strictly convex programs, so the optimum is unique and the two must agree to rounding whatever path the
/// range-space form's candidate list takes.
/// </summary>
public class RangeSpaceActiveSetTests
{
    [Fact]
    public void MatchesTheJFormOnRandomPrograms()
    {
        var random = new Random(2026);
        int infeasible = 0;
        int longActiveSets = 0;
        for (int trial = 0; trial < 300; trial++)
        {
            var program = LimitedProgram.Random(random);
            var plain = program.Solver(rangeSpace: false);
            var fast = program.Solver(rangeSpace: true);
            Assert.True(fast.UsesRangeSpace);
            var expected = program.Solve(plain, plain.CreateWorkspace());
            var actual = program.Solve(fast, fast.CreateWorkspace());
            Assert.Equal(expected.Result.Status, actual.Result.Status);
            if (expected.Result.Status == QpStatus.Infeasible)
            {
                infeasible++;
                continue;
            }

            Assert.Equal(QpStatus.Optimal, actual.Result.Status);
            AssertClose(expected.X, actual.X, $"trial {trial}");
            Kkt.Check(program.Gradient(actual.X), program.Rows, program.Rhs, 0, actual.X, 1e-8, $"trial {trial}");
            longActiveSets += actual.Result.ActiveCount >= 8 ? 1 : 0;
        }

        // The generator must reach what it is for: contradictory rows and active sets past the candidate list.
        Assert.InRange(infeasible, 1, 100);
        Assert.True(longActiveSets >= 50, $"only {longActiveSets} programs had 8 or more active rows");
    }

    [Fact]
    public void WarmStartsEqualColdStarts()
    {
        var random = new Random(7);
        var program = LimitedProgram.Random(random, variables: 40, infeasibleChance: 0);
        var plain = program.Solver(rangeSpace: false);
        var fast = program.Solver(rangeSpace: true);
        var warm = fast.CreateWorkspace();
        // Past MaxWarmChain, so the kept factor is used and then formed afresh once.
        for (int k = 0; k < DualActiveSetSolver.MaxWarmChain + 40; k++)
        {
            // Neighbouring programs, as consecutive historian rows give; every fifth switches a row off or on.
            for (int i = 0; i < program.Linear.Length; i++)
            {
                program.Linear[i] += 0.05 * ((2 * random.NextDouble()) - 1);
            }

            if (k % 5 == 4)
            {
                int row = random.Next(program.Rhs.Length);
                program.Rhs[row] = double.IsNegativeInfinity(program.Rhs[row]) ? program.SwitchedOff[row] : double.NegativeInfinity;
            }

            var expected = program.Solve(plain, plain.CreateWorkspace());
            var actual = program.Solve(fast, warm, warmStart: true);
            Assert.Equal(expected.Result.Status, actual.Result.Status);
            if (expected.Result.Status == QpStatus.Optimal)
            {
                AssertClose(expected.X, actual.X, $"step {k}");
            }
        }
    }

    [Fact]
    public void StopsAtTheIterationCapWithItsPoint()
    {
        var random = new Random(11);
        var program = LimitedProgram.Random(random, variables: 30, infeasibleChance: 0);
        var fast = program.Solver(rangeSpace: true);
        var full = program.Solve(fast, fast.CreateWorkspace());
        Assert.Equal(QpStatus.Optimal, full.Result.Status);
        Assert.True(full.Result.Iterations > 3);

        var capped = program.Solve(fast, fast.CreateWorkspace(), maxIterations: 3);
        Assert.Equal(QpStatus.IterationLimit, capped.Result.Status);

        // The point handed back is the method's iterate: x₀ plus the active directions, finite, not the optimum.
        Assert.All(capped.X, v => Assert.True(double.IsFinite(v)));
        Assert.NotEqual(full.X, capped.X);
    }

    [Fact]
    public void ReportsContradictoryRows()
    {
        // x₀ ≥ 1 and x₀ ≤ 0 through a bound and a two-entry row (x₀ − x₁ ≥ 1 with x₁ ≥ 0 … ≤ 0 pinned).
        var g = Matrix<double>.Build.DenseIdentity(2);
        var rows = new SparseRows(2, [[(0, 1.0), (1, -1.0)], [(1, 1.0)], [(1, -1.0)], [(0, -1.0)]]);
        var solver = new DualActiveSetSolver(new CholeskyFactor(g), rows, 0, rangeSpace: true);
        var x = new double[2];
        var result = solver.Solve([0.0, 0.0], [1.0, 0.0, 0.0, 0.0], x, unconstrained: false, 100, solver.CreateWorkspace());
        Assert.Equal(QpStatus.Infeasible, result.Status);
    }

    [Fact]
    public void ProgramsTooLargeKeepTheJForm()
    {
        Assert.True(RangeSpaceActiveSet.Fits(90, 360));
        Assert.False(RangeSpaceActiveSet.Fits(2000, 8000));

        // Set-up work bounds it too: few rows over many variables.
        Assert.False(RangeSpaceActiveSet.Fits(2000, 300));
    }

    private static void AssertClose(double[] expected, double[] actual, string what)
    {
        double scale = Math.Max(1, expected.Max(Math.Abs));
        for (int i = 0; i < expected.Length; i++)
        {
            Assert.True(Math.Abs(expected[i] - actual[i]) <= 1e-9 * scale, $"{what}: x[{i}] {actual[i]:R}, expected {expected[i]:R}");
        }
    }

    /// <summary>min ½xᵀGx + aᵀx under rows shaped like a limited plan's.</summary>
    private sealed class LimitedProgram
    {
        public required Matrix<double> G { get; init; }

        public required double[] Linear { get; init; }

        public required SparseRows Rows { get; init; }

        public required double[] Rhs { get; init; }

        /// <summary>Each row's right-hand side, kept for switching it back on.</summary>
        public required double[] SwitchedOff { get; init; }

        public static LimitedProgram Random(Random random, int? variables = null, double infeasibleChance = 0.1)
        {
            int n = variables ?? random.Next(2, 41);
            var m = Matrix<double>.Build.Dense(n, n, (_, _) => (2 * random.NextDouble()) - 1);
            var g = (m * m.Transpose()) + (0.05 * n * Matrix<double>.Build.DenseIdentity(n));
            var rows = new List<IReadOnlyList<(int, double)>>();
            var rhs = new List<double>();
            void Add(IReadOnlyList<(int, double)> row, double b)
            {
                rows.Add(row);
                rhs.Add(b);
            }

            for (int i = 0; i < n; i++)
            {
                // Bounds, as input limits.
                Add([(i, 1.0)], -0.5 - random.NextDouble());
                Add([(i, -1.0)], -0.5 - random.NextDouble());
                if (i > 0)
                {
                    // Rate rows on neighbours, as input-rate limits.
                    double rate = 0.2 + (0.5 * random.NextDouble());
                    Add([(i, 1.0), (i - 1, -1.0)], -rate);
                    Add([(i, -1.0), (i - 1, 1.0)], -rate);
                }
            }

            // Dense rows over a leading run of the variables, as output limits; now and then a window of them (the row
            // negated) sharing a last entry with the same sign, as a soft limit's slack.
            for (int k = 0; k < random.Next(0, n); k++)
            {
                int run = random.Next(1, n + 1);
                var row = Enumerable.Range(0, run).Select(j => (j, (2 * random.NextDouble()) - 1)).ToList();
                if (run >= 5 && run < n && random.NextDouble() < 0.5)
                {
                    Add([.. row, (n - 1, 1.0)], -1 - random.NextDouble());
                    Add([.. row.Select(e => (e.Item1, -e.Item2)), (n - 1, 1.0)], -1 - random.NextDouble());
                }
                else
                {
                    Add(row, -1 - random.NextDouble());
                }
            }

            // A repeated row and one implied by two others (dependent normals must be recognised).
            Add(rows[0], rhs[0]);
            if (n > 1)
            {
                Add([(1, 1.0), (0, 1.0)], rhs[0] + rhs[2]);
            }

            // Now and then, two rows that contradict each other.
            if (random.NextDouble() < infeasibleChance)
            {
                int i = random.Next(n);
                Add([(i, 1.0)], 1.0);
                Add([(i, -1.0)], 0.0);
            }

            var b = rhs.ToArray();
            var on = (double[])b.Clone();
            for (int j = 0; j < b.Length; j++)
            {
                if (random.NextDouble() < 0.05)
                {
                    b[j] = double.NegativeInfinity;
                }
            }

            // Linear terms large enough that the unconstrained minimiser breaks many rows.
            var a = Enumerable.Range(0, n).Select(_ => 3 * n * ((2 * random.NextDouble()) - 1)).ToArray();
            return new LimitedProgram { G = g, Linear = a, Rows = new SparseRows(n, rows), Rhs = b, SwitchedOff = on };
        }

        public DualActiveSetSolver Solver(bool rangeSpace) => new(new CholeskyFactor(G), Rows, 0, rangeSpace: rangeSpace);

        public double[] Gradient(double[] x) => (G * Vector<double>.Build.DenseOfArray(x) + Vector<double>.Build.DenseOfArray(Linear)).ToArray();

        public (QpResult Result, double[] X) Solve(DualActiveSetSolver solver, QpWorkspace workspace, bool warmStart = false, int maxIterations = 10_000)
        {
            var x = new double[Linear.Length];
            var result = solver.Solve(Linear, Rhs, x, unconstrained: false, maxIterations, workspace, warmStart);
            return (result, x);
        }
    }
}
