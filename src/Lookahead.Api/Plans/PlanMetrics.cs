using Prometheus;

namespace Lookahead.Api.Plans;

/// <summary>Plans computed and their solve times, by route (plan, alias, replay), in the application's own registry.</summary>
public sealed class PlanMetrics
{
    public PlanMetrics(CollectorRegistry registry)
    {
        var factory = Metrics.WithCustomRegistry(registry);
        Duration = factory.CreateHistogram(
            "lookahead_plan_duration_seconds",
            "Time to compute one plan (the solve only, not parsing or writing).",
            ["endpoint"],
            new HistogramConfiguration { Buckets = Histogram.ExponentialBuckets(0.000_001, 2, 20) });
        Plans = factory.CreateCounter("lookahead_plans_total", "Plans computed, by endpoint and status.", "endpoint", "status");
        SimulatedPlans = factory.CreateCounter(
            "lookahead_simulated_plans_total", "Plans computed inside closed-loop simulations, one per simulated step, by outcome (optimal, not-optimal).", "outcome");
    }

    /// <summary>The simulator plans in the core, so its plans are counted per run from its result.</summary>
    public Counter SimulatedPlans { get; }

    public Histogram Duration { get; }

    public Counter Plans { get; }
}
