using Lookahead.Core.Planning;

namespace Lookahead.Benchmarks;

/// <summary>Exact per-thread allocation counts, used by the setups to put the Allocated column in context.</summary>
internal static class Allocations
{
    /// <summary>Bytes of an empty Plan of the model's shape, and bytes one <see cref="CompiledModel.Plan"/> call allocates (median of a few calls).</summary>
    public static (long Result, long PerPlan) PlanBytes(CompiledModel model, PlanRequest request)
    {
        // Warm up so that no one-time allocation (JIT, statics, pools) is counted.
        for (int i = 0; i < 20; i++)
        {
            _ = model.Plan(request);
        }

        long before = GC.GetAllocatedBytesForCurrentThread();
        var empty = new Plan(model.Horizon, model.StateCount, model.InputCount, model.OutputCount);
        long result = GC.GetAllocatedBytesForCurrentThread() - before;
        GC.KeepAlive(empty);

        var samples = new long[7];
        for (int i = 0; i < samples.Length; i++)
        {
            before = GC.GetAllocatedBytesForCurrentThread();
            var plan = model.Plan(request);
            samples[i] = GC.GetAllocatedBytesForCurrentThread() - before;
            GC.KeepAlive(plan);
        }

        Array.Sort(samples);
        return (result, samples[samples.Length / 2]);
    }
}
