using BenchmarkDotNet.Attributes;
using Lookahead.Core.Planning;

namespace Lookahead.Benchmarks;

/// <summary>
/// One unconstrained plan on a cached compiled model from a fixed state (no reference, no previous input), and
/// the first-move-only answer for the same request.
/// The setup prints the bytes of the result (the Plan object and its three arrays, measured by allocating
/// an empty Plan of the same shape) next to the bytes one Plan call allocates, so the Allocated column can be read
/// against them.
/// </summary>
[Config(typeof(PlanFlopsConfig))]
public class PlanBenchmarks
{
    private CompiledModel model = null!;
    private PlanRequest request = null!;
    private double[] firstMove = null!;

    /// <summary>M1 = six-masses (n 12, m 3, N 30), M2 = random-4x2-N100, M3 = random-50x10-N50.</summary>
    [Params("M1", "M2", "M3")]
    public string Model { get; set; } = "M1";

    [GlobalSetup]
    public void Setup()
    {
        var c = BenchmarkModels.Get(Model);
        model = ModelCompiler.Compile(c.Document);
        request = new PlanRequest(c.State);
        firstMove = new double[model.InputCount];
        var plan = model.Plan(request);
        double deviation = MaxRelativeDeviation(plan.Inputs, c.ReferenceInputs);
        if (deviation > 1e-6)
        {
            throw new InvalidOperationException($"{Model}: the plan differs from the reference inputs by {deviation:g3} (relative)");
        }

        var first = model.FirstMove(request, firstMove);
        double firstDeviation = MaxRelativeDeviation(firstMove, plan.Inputs.AsSpan(0, model.InputCount));
        double costDeviation = Math.Abs(first.Cost - plan.Cost) / Math.Max(1, Math.Abs(plan.Cost));
        if (firstDeviation > 1e-10 || costDeviation > 1e-9)
        {
            throw new InvalidOperationException($"{Model}: FirstMove differs from Plan (u_0 by {firstDeviation:g3}, cost by {costDeviation:g3})");
        }

        var (result, perPlan) = Allocations.PlanBytes(model, request);
        bool refines = model.Diagnostics.HessianCondition > CompiledModel.RefinementCondition;
        Console.WriteLine($"// {Model} ({c.Name}): n={model.StateCount} m={model.InputCount} N={model.Horizon}; Hessian condition {model.Diagnostics.HessianCondition:g3} (refinement steps: {(refines ? "yes" : "no")}); max relative deviation from the reference inputs {deviation:g3}");
        Console.WriteLine($"// {Model}: result (Plan + Inputs + States + Outputs) = {result} B; one Plan call allocates {perPlan} B; difference {perPlan - result} B");
        Console.WriteLine($"// {Model}: FirstMove vs Plan: u_0 relative difference {firstDeviation:g3}, cost relative difference {costDeviation:g3}");
    }

    [Benchmark]
    public Plan Plan() => model.Plan(request);

    /// <summary>CompiledModel.FirstMove: u_0 and J* only, into a caller's buffer (what replay needs).</summary>
    [Benchmark]
    public double FirstMove() => model.FirstMove(request, firstMove).Cost;

    internal static double MaxRelativeDeviation(ReadOnlySpan<double> actual, ReadOnlySpan<double> expected)
    {
        double scale = 0;
        double worst = 0;
        for (int i = 0; i < expected.Length; i++)
        {
            scale = Math.Max(scale, Math.Abs(expected[i]));
            worst = Math.Max(worst, Math.Abs(actual[i] - expected[i]));
        }

        return worst / Math.Max(scale, double.Epsilon);
    }
}
