using BenchmarkDotNet.Attributes;
using Lookahead.Core.Planning;

namespace Lookahead.Benchmarks;

/// <summary>
/// M1 with hard input limits (±0.5) and with input plus rate limits (±0.2, previous input zero so the Δu_0 rows
/// are on), against the unconstrained M1 plan as the baseline. The setup prints iterations, status and active
/// limits of each plan, so time per iteration can be read off the table.
/// </summary>
public class ConstrainedPlanBenchmarks
{
    private CompiledModel unconstrained = null!;
    private CompiledModel inputLimited = null!;
    private CompiledModel rateLimited = null!;
    private PlanRequest unconstrainedRequest = null!;
    private PlanRequest inputRequest = null!;
    private PlanRequest rateRequest = null!;

    [GlobalSetup]
    public void Setup()
    {
        var free = BenchmarkModels.Get(BenchmarkModels.SixMasses);
        var input = BenchmarkModels.Get(BenchmarkModels.SixMassesInputLimits);
        var rate = BenchmarkModels.Get(BenchmarkModels.SixMassesInputAndRateLimits);
        unconstrained = ModelCompiler.Compile(free.Document);
        inputLimited = ModelCompiler.Compile(input.Document);
        rateLimited = ModelCompiler.Compile(rate.Document);
        unconstrainedRequest = new PlanRequest(free.State);
        inputRequest = new PlanRequest(input.State);
        rateRequest = new PlanRequest(rate.State, PreviousInput: new double[rateLimited.InputCount]);

        Describe("unconstrained", unconstrained, unconstrainedRequest, free.ReferenceInputs, null);
        Describe("input limits", inputLimited, inputRequest, input.ReferenceInputs, input.ActiveInputBoundCount);

        // The reference plan of the rate case has no previous input (no Δu_0 rows); check the solver against it
        // that way, then describe the benchmarked request (previous input 0).
        Describe("input+rate limits, no previous input", rateLimited, new PlanRequest(rate.State), rate.ReferenceInputs, rate.ActiveInputBoundCount);
        Describe("input+rate limits, previous input 0 (benchmarked)", rateLimited, rateRequest, null, null);
    }

    [Benchmark(Baseline = true)]
    public Plan Unconstrained() => unconstrained.Plan(unconstrainedRequest);

    [Benchmark]
    public Plan InputLimits() => inputLimited.Plan(inputRequest);

    [Benchmark]
    public Plan InputAndRateLimits() => rateLimited.Plan(rateRequest);

    private static void Describe(string label, CompiledModel model, PlanRequest request, double[]? referenceInputs, int? referenceActive)
    {
        var plan = model.Plan(request);
        var kinds = plan.ActiveLimits.GroupBy(l => l.Kind).OrderBy(g => g.Key).Select(g => $"{g.Key} {g.Count()}");
        string counts = plan.ActiveLimits.Count == 0 ? "none" : string.Join(", ", kinds);
        Console.WriteLine($"// M1 {label}: status {plan.Status}, iterations {plan.Iterations}, limit rows {model.LimitRowCount}, active limits {plan.ActiveLimits.Count} ({counts}), cost {plan.Cost:g10}");
        if (plan.Status != PlanStatus.Optimal)
        {
            throw new InvalidOperationException($"M1 {label}: plan status {plan.Status}");
        }

        if (referenceInputs is not null)
        {
            double deviation = PlanBenchmarks.MaxRelativeDeviation(plan.Inputs, referenceInputs);
            int bounds = plan.ActiveLimits.Count(l => l.Kind is LimitKind.InputMin or LimitKind.InputMax);
            Console.WriteLine($"//   vs reference plan: max relative input deviation {deviation:g3}; input bounds active {bounds} (reference {referenceActive?.ToString() ?? "n/a"})");
            if (deviation > 1e-6)
            {
                throw new InvalidOperationException($"M1 {label}: the plan differs from the reference inputs by {deviation:g3}");
            }
        }

        var (result, perPlan) = Allocations.PlanBytes(model, request);
        Console.WriteLine($"//   allocation: result {result} B, one Plan call {perPlan} B");
    }
}
