using Lookahead.Core.Models;
using Lookahead.Core.Numerics;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Numerics;
using Lookahead.Core.Tests.Support;
using MathNet.Numerics.LinearAlgebra;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

/// <summary>
/// The program is condensed once for both variants (with and without the Δu_0 term) and factored, solved and
/// held on arrays by either kernel implementation. Each check here is against <see cref="DenseCondensedReference"/>,
/// which builds H, F and M₀ of each variant from the prediction matrix Γ term by term.
/// </summary>
public class SharedCondensingTests
{
    public static TheoryData<string> Implementations() => DenseLinearAlgebraTests.Implementations();

    private static DenseLinearAlgebra Named(string name) => DenseLinearAlgebraTests.Named(name);

    /// <summary>A random plant with full (not diagonal) weights and S ≠ 0, so every block of every term is exercised.</summary>
    private sealed record Case(Matrix<double> A, Matrix<double> B, Matrix<double> C, Matrix<double> Q, Matrix<double> R, Matrix<double> S, Matrix<double> P, int Horizon)
    {
        public static Case Random(int seed, int n, int m, int p, int horizon)
        {
            var random = new Random(seed);
            var (a, b) = TestModels.Random(random, n, m, 1.05);
            var build = Matrix<double>.Build;
            var c = build.Dense(p, n, (_, _) => (random.NextDouble() * 2) - 1);
            return new Case(
                build.DenseOfRowArrays(a), build.DenseOfRowArrays(b), c,
                DenseCondensedReference.RandomSpd(random, p, 0.5),
                DenseCondensedReference.RandomSpd(random, m, 0.2),
                DenseCondensedReference.RandomSpd(random, m, 0.3),
                DenseCondensedReference.RandomSpd(random, n, 1.0),
                horizon);
        }

        public DenseCondensedReference.Result Reference(bool withPreviousInput) =>
            DenseCondensedReference.Build(A, B, C, Q, R, S, P, Horizon, withPreviousInput);

        public ModelDocument Document(LimitsSpec? limits = null) => new(
            "shared-condensing",
            new PlantSpec(A.ToRowArrays(), B.ToRowArrays(), C.ToRowArrays(), 1.0),
            new CostSpec(Horizon, WeightSpec.FromMatrix(Q.ToRowArrays()), WeightSpec.FromMatrix(R.ToRowArrays()), WeightSpec.FromMatrix(S.ToRowArrays()), new TerminalWeightSpec(TerminalWeightKind.Explicit, P.ToRowArrays())),
            limits);
    }

    [Theory]
    [MemberData(nameof(Implementations))]
    public void OneCondensingGivesBothVariantsOfTheDenseConstruction(string implementation)
    {
        var c = Case.Random(21, 5, 2, 3, 7);
        var problem = Condensing.Condense(c.A, c.B, c.C, c.Q, c.R, c.S, c.P, c.Horizon, Named(implementation));
        int rows = problem.Rows;
        var without = c.Reference(withPreviousInput: false);
        var with = c.Reference(withPreviousInput: true);

        Assertions.Close(without.Hessian.ToColumnMajorArray(), problem.Hessian, 1e-12, "H without the Δu_0 term");
        Assertions.Close(without.Maps.ToColumnMajorArray(), problem.Maps, 1e-12, "F without the Δu_0 term");
        Assertions.Close(without.FreeCost.ToColumnMajorArray(), problem.FreeCost.ToColumnMajorArray(), 1e-12, "M₀ without the Δu_0 term");

        // The variant with the term, from the shared parts: S on H's first block (lower triangle), −S in Fup, S in M₀.
        var hessian = (double[])problem.Hessian.Clone();
        problem.AddPreviousInputTerm(hessian);
        var expected = with.Hessian;
        for (int j = 0; j < rows; j++)
        {
            for (int i = j; i < rows; i++)
            {
                Assertions.CloseScalar(expected[i, j], hessian[(j * rows) + i], 1e-12, $"H with the Δu_0 term [{i},{j}]");
            }
        }

        var maps = (double[])problem.Maps.Clone();
        problem.PreviousInputMap(maps);
        Assertions.Close(with.Maps.ToColumnMajorArray(), maps, 1e-12, "F with the Δu_0 term");
        Assertions.Close(with.FreeCost.ToColumnMajorArray(), problem.FreeCostWithPreviousInput().ToColumnMajorArray(), 1e-12, "M₀ with the Δu_0 term");
        Assert.True(problem.HasRateWeight);
    }

    // The per-variant form (kept for the plan-parts benchmark) is the shared one with the term applied.
    [Fact]
    public void PerVariantBuildMatchesTheDenseConstruction()
    {
        var c = Case.Random(4, 4, 3, 2, 5);
        foreach (bool withPrevious in new[] { false, true })
        {
            var built = Condensing.Build(c.A, c.B, c.C, c.Q, c.R, c.S, c.P, c.Horizon, withPrevious);
            var reference = c.Reference(withPrevious);
            Assertions.Close(reference.Hessian.ToRowArrays(), built.Hessian, 1e-12, $"H (previous input {withPrevious})");
            Assertions.Close(reference.Maps.ToRowArrays(), built.Fx.Append(built.Fr).Append(built.Fxs).Append(built.Fus).Append(built.Fup), 1e-12, $"F (previous input {withPrevious})");
            Assertions.Close(reference.FreeCost.ToRowArrays(), built.FreeCost, 1e-12, $"M₀ (previous input {withPrevious})");
            Assert.Equal(built.Hessian, built.Hessian.Transpose());
        }
    }

    /// <summary>The cases of the next test with both variants' dense construction, built once for every implementation.</summary>
    private static readonly Lazy<(Case Case, Dictionary<bool, DenseCondensedReference.Result> Variants, int Seed)[]> DenseCases = new(() =>
        new[] { (Case.Random(8, 4, 2, 3, 9), 1), (Case.Random(9, 4, 16, 2, 38), 2) }
            .Select(t => (t.Item1, new[] { false, true }.ToDictionary(w => w, w => t.Item1.Reference(w)), t.Item2))
            .ToArray());

    // U* = −H⁻¹Fz and J* = zᵀ(M₀ − FᵀH⁻¹F)z of each variant, with H, F, M₀ from Γ and solved by MathNet here.
    // The plan's own targets (x_s, u_s) enter z, so only condensing, factor, gains and cost form are under test.
    // Sizes on both sides of HessianCondition.ExactUpTo take both condition-number paths.
    [Theory]
    [MemberData(nameof(Implementations))]
    public void CompiledPlansOfBothVariantsMatchTheDenseConstruction(string implementation)
    {
        foreach (var (c, variants, seed) in DenseCases.Value)
        {
            var model = ModelCompiler.Compile(c.Document(), null, Named(implementation));
            var random = new Random(seed);
            int n = c.A.RowCount, m = c.B.ColumnCount, p = c.C.RowCount;
            var state = TestModels.RandomVector(random, n);
            var reference = TestModels.RandomVector(random, p);
            var previous = TestModels.RandomVector(random, m);
            foreach (bool withPrevious in new[] { false, true })
            {
                var request = new PlanRequest(state, reference, withPrevious ? previous : null);
                var plan = model.Plan(request);
                var dense = variants[withPrevious];
                var z = Vector<double>.Build.DenseOfEnumerable(state.Concat(reference).Concat(plan.Target!.State).Concat(plan.Target.Input).Concat(withPrevious ? previous : new double[m]));
                var factor = dense.Hessian.Cholesky();
                var expected = -factor.Solve(dense.Maps * z);
                Assertions.Close(expected.ToArray(), plan.Inputs, 1e-10, $"{implementation} N·m = {model.DecisionVariables}, previous input {withPrevious}: U*");

                var firstMove = new double[m];
                var result = model.FirstMove(request, firstMove);
                double cost = z * ((dense.FreeCost - dense.Maps.TransposeThisAndMultiply(factor.Solve(dense.Maps))) * z);
                Assertions.CloseScalar(cost, result.Cost, 1e-9, $"{implementation} N·m = {model.DecisionVariables}, previous input {withPrevious}: J*");
                Assertions.Close(expected.SubVector(0, m).ToArray(), firstMove, 1e-10, "u_0");
            }

            // The condition number: exact eigenvalues up to ExactUpTo; above it the power-iteration estimate, which
            // must be the one the same iteration gives on the Γ-built H (it is accurate to a few digits only).
            var h = variants[false].Hessian;
            double expectedCondition;
            if (model.DecisionVariables <= HessianCondition.ExactUpTo)
            {
                var eigenvalues = h.Evd(Symmetricity.Symmetric).EigenValues.Select(v => v.Real).ToArray();
                expectedCondition = eigenvalues.Max() / eigenvalues.Min();
            }
            else
            {
                expectedCondition = HessianCondition.Compute(h, new CholeskyFactor(h));
            }

            Assertions.CloseScalar(expectedCondition, model.Diagnostics.HessianCondition, 1e-8, $"{implementation} condition number, N·m = {model.DecisionVariables}");
        }
    }

    // Under input limits the factor is kept for the limited solver. The plan must meet the optimality conditions of
    // the box-limited program built from Γ (common practice): with g = HU + Fz, g_i = 0 strictly inside the box,
    // g_i ≥ 0 on a lower bound and g_i ≤ 0 on an upper one.
    [Theory]
    [MemberData(nameof(Implementations))]
    public void LimitedPlansOnTheKeptFactorMeetTheBoxOptimalityConditions(string implementation)
    {
        var c = Case.Random(12, 6, 3, 4, 20);
        const double Bound = 0.2;
        var limits = new LimitsSpec(InputMin: [-Bound, -Bound, -Bound], InputMax: [Bound, Bound, Bound]);
        var model = ModelCompiler.Compile(c.Document(limits), null, Named(implementation));
        var random = new Random(3);
        int activeSeen = 0;
        for (int k = 0; k < 6; k++)
        {
            bool withPrevious = k % 2 == 1;
            var previous = withPrevious ? TestModels.RandomVector(random, 3, Bound) : null;
            var request = new PlanRequest(TestModels.RandomVector(random, 6, 3), null, previous);
            var plan = model.Plan(request);
            Assert.Equal(PlanStatus.Optimal, plan.Status);
            var dense = c.Reference(withPrevious);
            var z = Vector<double>.Build.DenseOfEnumerable(request.State.Concat(new double[4 + 6 + 3]).Concat(previous ?? new double[3]));
            var u = Vector<double>.Build.DenseOfArray(plan.Inputs);
            var gradient = (dense.Hessian * u) + (dense.Maps * z);
            double scale = Math.Max(1.0, gradient.AbsoluteMaximum());
            for (int i = 0; i < u.Count; i++)
            {
                string what = $"{implementation} plan {k}, input {i}: u = {u[i]:g6}, gradient {gradient[i]:g6}";
                Assert.True(u[i] >= -Bound - 1e-12 && u[i] <= Bound + 1e-12, what);
                if (u[i] <= -Bound + 1e-9)
                {
                    Assert.True(gradient[i] >= -1e-8 * scale, what);
                    activeSeen++;
                }
                else if (u[i] >= Bound - 1e-9)
                {
                    Assert.True(gradient[i] <= 1e-8 * scale, what);
                    activeSeen++;
                }
                else
                {
                    Assert.True(Math.Abs(gradient[i]) <= 1e-8 * scale, what);
                }
            }
        }

        Assert.True(activeSeen > 0, "no input limit was active: the case does not test the limited solve");
    }

    // Every model keeps the factor of its N·m × N·m Hessian — a plan with a reference schedule or a measured
    // disturbance takes one Newton step with it — and the cache accounts for it.
    [Fact]
    public void EveryModelKeepsItsFactorAndAccountsForIt()
    {
        var c = Case.Random(30, 4, 4, 2, 100);
        long square = sizeof(double) * 400L * 400L;
        var plain = ModelCompiler.Compile(c.Document());
        Assert.True(plain.Diagnostics.HessianCondition <= CompiledModel.RefinementCondition, "the case must not take refinement steps");
        Assert.True(plain.EstimatedBytes >= square, $"{plain.EstimatedBytes:N0} bytes accounted; one factor alone is {square:N0}");
        var schedule = plain.Plan(new PlanRequest(TestModels.RandomVector(new Random(1), 4, 5), ReferenceSchedule: [[1.0, 0.0], [0.0, 0.0]]));
        Assert.Equal(PlanStatus.Optimal, schedule.Status);

        var limited = ModelCompiler.Compile(c.Document(new LimitsSpec(InputMin: [-1.0, -1.0, -1.0, -1.0], InputMax: [1.0, 1.0, 1.0, 1.0])));
        Assert.True(limited.EstimatedBytes >= 2 * square, $"{limited.EstimatedBytes:N0} bytes accounted; the factors of both variants alone are {2 * square:N0}");
        var request = new PlanRequest(TestModels.RandomVector(new Random(1), 4, 5), null, [0.1, 0.1, 0.1, 0.1]);
        Assert.Equal(PlanStatus.Optimal, limited.Plan(request).Status);
    }

    // Models are compiled on many request threads at once; the kernels (OpenBLAS at one thread per call where
    // installed) must give every compile the same result as compiling alone.
    [Fact]
    public void ParallelCompilesEqualSequentialCompiles()
    {
        var cases = Enumerable.Range(0, 8).Select(i => Case.Random(40 + i, 6, 2, 3, 30 + (5 * i))).ToArray();
        var request = new PlanRequest(TestModels.RandomVector(new Random(2), 6), null, [0.1, -0.1]);
        var sequential = cases.Select(c => ModelCompiler.Compile(c.Document()).Plan(request).Inputs).ToArray();
        var parallel = new double[cases.Length][];
        Parallel.For(0, cases.Length * 3, new ParallelOptions { MaxDegreeOfParallelism = 8 }, i => parallel[i % cases.Length] = ModelCompiler.Compile(cases[i % cases.Length].Document()).Plan(request).Inputs);
        // Equal to rounding: a race gives garbage, not last-digit differences (which buffer alignment alone may cause).
        for (int i = 0; i < cases.Length; i++)
        {
            Assertions.Close(sequential[i], parallel[i], 1e-13, $"model {i}");
        }
    }
}
