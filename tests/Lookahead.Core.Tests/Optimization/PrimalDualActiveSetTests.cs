using Lookahead.Core.Numerics;
using Lookahead.Core.Optimization;
using Lookahead.Core.Tests.Support;
using MathNet.Numerics.LinearAlgebra;
using Xunit;

namespace Lookahead.Core.Tests.Optimization;

/// <summary>
/// The guessed cold start (<see cref="PrimalDualActiveSet"/>) must reach the optimum the dual active-set method reaches
/// on its own: random strictly convex programs with bounds on single variables, solved both ways and checked against
/// the independent KKT test; a guesser allowed one guess must hand every program it cannot finish to the dual
/// active-set method without changing the answer.
/// </summary>
public class PrimalDualActiveSetTests
{
    private const int Programs = 200;

    [Fact]
    public void GuessedColdStartsReachTheDualActiveSetOptimum()
    {
        var random = new Random(41);
        int guessed = 0;
        for (int k = 0; k < Programs; k++)
        {
            var program = BoundProgram.Random(random);
            var plain = program.Solver(guess: false);
            var fast = program.Solver(guess: true);
            Assert.True(fast.GuessesActiveSets);
            var expected = program.Solve(plain, plain.CreateWorkspace());
            var workspace = fast.CreateWorkspace();
            var actual = program.Solve(fast, workspace);
            Assert.Equal(QpStatus.Optimal, actual.Result.Status);
            AssertClose(expected.X, actual.X, $"program {k}");
            Kkt.Check(program.Gradient(actual.X), program.Rows, program.Rhs, 0, actual.X, what: $"program {k}");
            Assert.Equal(Sorted(workspace.ActiveConstraints(actual.Result.ActiveCount)), Sorted(ActiveRows(program, actual.X).ToArray()));
            // A solve finished by the guesser leaves no factorisation behind.
            guessed += workspace.FactoredCount < 0 && actual.Result.ActiveCount > 0 ? 1 : 0;
        }

        // The test is about the guesser: most programs with active bounds must have been finished by it.
        Assert.True(guessed > Programs / 2, $"only {guessed} of {Programs} programs were finished by guesses");
    }

    [Fact]
    public void AGuesserThatGivesUpLeavesTheOptimumUnchanged()
    {
        var random = new Random(42);
        int handedOver = 0;
        for (int k = 0; k < Programs; k++)
        {
            var program = BoundProgram.Random(random);
            var plain = program.Solver(guess: false);
            var once = program.Solver(guess: true, maxGuesses: 1);
            var expected = program.Solve(plain, plain.CreateWorkspace());
            var actual = program.Solve(once, once.CreateWorkspace());
            Assert.Equal(QpStatus.Optimal, actual.Result.Status);
            AssertClose(expected.X, actual.X, $"program {k}");
            handedOver += actual.Result.Iterations > 1 ? 1 : 0;
        }

        Assert.True(handedOver > 0, "no program needed the dual active-set method after one guess");
    }

    [Fact]
    public void WarmSolvesGuessFromThePreviousSetAndMatchColdSolves()
    {
        var random = new Random(43);
        var program = BoundProgram.Random(random, variables: 30);
        var plain = program.Solver(guess: false);
        var fast = program.Solver(guess: true);
        var warm = fast.CreateWorkspace();
        for (int k = 0; k < 50; k++)
        {
            // Neighbouring linear terms, as consecutive rows of a historian give.
            for (int i = 0; i < program.Linear.Length; i++)
            {
                program.Linear[i] += 0.05 * ((2 * random.NextDouble()) - 1);
            }

            var expected = program.Solve(plain, plain.CreateWorkspace());
            var actual = program.Solve(fast, warm, warmStart: true);
            Assert.Equal(QpStatus.Optimal, actual.Result.Status);
            AssertClose(expected.X, actual.X, $"step {k}");
        }
    }

    private static void AssertClose(double[] expected, double[] actual, string what)
    {
        double scale = Math.Max(1, expected.Max(Math.Abs));
        for (int i = 0; i < expected.Length; i++)
        {
            Assert.True(Math.Abs(expected[i] - actual[i]) <= 1e-9 * scale, $"{what}: x[{i}] {actual[i]:R}, expected {expected[i]:R}");
        }
    }

    private static int[] Sorted(ReadOnlySpan<int> rows)
    {
        var copy = rows.ToArray();
        Array.Sort(copy);
        return copy;
    }

    private static List<int> ActiveRows(BoundProgram program, double[] x)
    {
        var active = new List<int>();
        for (int j = 0; j < program.Rows.RowCount; j++)
        {
            if (!double.IsNegativeInfinity(program.Rhs[j]) && Math.Abs(program.Rows.Dot(j, x) - program.Rhs[j]) <= 1e-9 * (1 + Math.Abs(program.Rhs[j])))
            {
                active.Add(j);
            }
        }

        return active;
    }

    /// <summary>min ½xᵀGx + aᵀx with lower and upper bounds on each variable (some switched off by −∞).</summary>
    private sealed class BoundProgram
    {
        public required Matrix<double> G { get; init; }

        public required double[] Linear { get; init; }

        public required SparseRows Rows { get; init; }

        public required double[] Rhs { get; init; }

        public static BoundProgram Random(Random random, int? variables = null)
        {
            int n = variables ?? random.Next(2, 41);
            var m = Matrix<double>.Build.Dense(n, n, (_, _) => (2 * random.NextDouble()) - 1);
            var g = (m * m.Transpose()) + (0.05 * n * Matrix<double>.Build.DenseIdentity(n));
            var rows = new List<IReadOnlyList<(int, double)>>();
            var rhs = new List<double>();
            for (int i = 0; i < n; i++)
            {
                double low = -0.5 - random.NextDouble();
                double high = 0.5 + random.NextDouble();
                rows.Add([(i, 1.0)]);
                rhs.Add(random.NextDouble() < 0.1 ? double.NegativeInfinity : low);
                rows.Add([(i, -1.0)]);
                rhs.Add(random.NextDouble() < 0.1 ? double.NegativeInfinity : -high);
            }

            // Linear terms large enough that the unconstrained minimiser breaks many bounds.
            var a = Enumerable.Range(0, n).Select(_ => 3 * n * ((2 * random.NextDouble()) - 1)).ToArray();
            return new BoundProgram { G = g, Linear = a, Rows = new SparseRows(n, rows), Rhs = [.. rhs] };
        }

        public DualActiveSetSolver Solver(bool guess, int maxGuesses = PrimalDualActiveSet.MaxIterations) =>
            new(new CholeskyFactor(G), Rows, 0, guess, maxGuesses);

        public (QpResult Result, double[] X) Solve(DualActiveSetSolver solver, QpWorkspace workspace, bool warmStart = false)
        {
            var x = new double[Linear.Length];
            var result = solver.Solve(Linear, Rhs, x, unconstrained: false, 10_000, workspace, warmStart);
            return (result, x);
        }

        public double[] Gradient(double[] x) => (G * Vector<double>.Build.DenseOfArray(x)).Add(Vector<double>.Build.DenseOfArray(Linear)).ToArray();
    }
}
