using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

/// <summary>
/// A warm-started limited plan starts from the previous plan's active set; the program is strictly convex, so it must
/// end at the same optimum as a cold start, whatever the previous plan was.
/// </summary>
public class WarmStartTests
{
    /// <summary>The cold-store demo (the service's own demo document) with all its limits.</summary>
    internal static CompiledModel ColdStore() => ModelCompiler.Compile(DemoModel.Document);

    [Fact]
    public void WarmPlansAlongAClosedLoopEqualColdPlans()
    {
        var model = ColdStore();
        var warm = model.CreateWarmStart();
        var random = new Random(5);
        double[] x = [3.0, 2.5, 2.0];
        double[] previous = [0.5, 0.5, 0.0];
        double[]? reference = null;
        int warmIterations = 0, coldIterations = 0;
        for (int step = 0; step < 120; step++)
        {
            if (step == 60)
            {
                reference = [-1.0, 0.0, 0.5];
            }

            var request = new PlanRequest((double[])x.Clone(), reference, (double[])previous.Clone());
            var cold = model.Plan(request, model.CreateWarmStart()); // a fresh warm start: the active set from cold
            var hot = model.Plan(request, warm);
            AssertSamePlan(cold, hot, $"step {step}");
            warmIterations += hot.Iterations;
            coldIterations += cold.Iterations;

            // The plant moves under the first move, with a little noise, as a historian would record it.
            var next = new double[3];
            for (int i = 0; i < 3; i++)
            {
                next[i] = cold.States[3 + i] + (random.NextDouble() - 0.5) * 0.01;
            }

            x = next;
            previous = cold.Input(0).ToArray();
        }

        Assert.True(warmIterations < coldIterations / 2, $"warm {warmIterations} iterations against cold {coldIterations} along a closed loop");
    }

    [Fact]
    public void WarmPlansOfUnrelatedStatesEqualColdPlans()
    {
        var model = ColdStore();
        var warm = model.CreateWarmStart();
        var random = new Random(17);
        for (int i = 0; i < 80; i++)
        {
            var state = TestModels.RandomVector(random, 3, 4.0);
            double[]? previous = i % 3 == 0 ? null : Enumerable.Range(0, 3).Select(_ => random.NextDouble() * 1.6 - 0.3).ToArray();
            double[]? reference = i % 4 == 0 ? TestModels.RandomVector(random, 3, 1.5) : null;
            var request = new PlanRequest(state, reference, previous);
            var cold = model.Plan(request, model.CreateWarmStart()); // a fresh warm start: the active set from cold
            var hot = model.Plan(request, warm);
            AssertSamePlan(cold, hot, $"state {i}");
        }
    }

    // A single costly warm plan is a jump the next warm start follows; from the second costly plan in a row on, the
    // sequence is planned cold for 1, 2, 4 … (at most 64) plans after each; one cheap warm plan resets the count.
    [Fact]
    public void CostlyWarmPlansInARowSwitchTheSequenceToColdPlansForGrowingRuns()
    {
        var warm = ColdStore().CreateWarmStart();
        int costly = PlanWarmStart.CheapIterations + 1;
        int ColdRun()
        {
            int run = 0;
            while (warm.TakeColdTurn())
            {
                run++;
            }

            return run;
        }

        warm.Record(costly);
        Assert.Equal(0, ColdRun());
        var runs = new List<int>();
        for (int i = 0; i < 9; i++)
        {
            warm.Record(costly);
            runs.Add(ColdRun());
        }

        Assert.Equal([1, 2, 4, 8, 16, 32, 64, 64, 64], runs);
        warm.Record(PlanWarmStart.CheapIterations);
        warm.Record(costly);
        Assert.Equal(0, ColdRun());
        warm.Record(costly);
        Assert.Equal(1, ColdRun());
    }

    [Fact]
    public void AWarmStartBelongsToItsModel()
    {
        var model = ColdStore();
        var other = ColdStore();
        Assert.Throws<ArgumentException>(() => other.Plan(new PlanRequest([1.0, 1.0, 1.0]), model.CreateWarmStart()));
    }

    private static void AssertSamePlan(Plan cold, Plan hot, string what)
    {
        Assert.Equal(cold.Status, hot.Status);
        Assertions.Close(cold.Inputs, hot.Inputs, 1e-9, what);
        Assert.True(Math.Abs(cold.Cost - hot.Cost) <= 1e-9 * Math.Max(1, Math.Abs(cold.Cost)), $"{what}: cost {cold.Cost:R} cold, {hot.Cost:R} warm");
        Assert.Equal(cold.Warnings.Select(w => w.Code), hot.Warnings.Select(w => w.Code));
    }
}
