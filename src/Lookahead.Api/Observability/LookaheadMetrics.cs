using Prometheus;

namespace Lookahead.Api.Observability;

/// <summary>
/// The service's own Prometheus metrics, in a registry per application instance (so two hosts in one process,
/// as in tests, never share counters).
/// </summary>
public sealed class LookaheadMetrics
{
    public LookaheadMetrics()
    {
        Registry = Metrics.NewCustomRegistry();
        var factory = Metrics.WithCustomRegistry(Registry);
        PlanDuration = factory.CreateHistogram(
            "lookahead_plan_duration_seconds",
            "Time to compute one plan (the solve only, not parsing or writing).",
            ["endpoint"],
            new HistogramConfiguration { Buckets = Histogram.ExponentialBuckets(0.000_001, 2, 20) });
        Plans = factory.CreateCounter("lookahead_plans_total", "Plans computed, by endpoint and status.", "endpoint", "status");
        Compilations = factory.CreateCounter("lookahead_model_compilations_total", "Models compiled (registration or cache miss).");
        CompileDuration = factory.CreateHistogram(
            "lookahead_model_compile_duration_seconds",
            "Time to compile one model.",
            new HistogramConfiguration { Buckets = Histogram.ExponentialBuckets(0.000_1, 2, 20) });
        CacheHits = factory.CreateCounter("lookahead_model_cache_hits_total", "Compiled-model cache hits.");
        CacheMisses = factory.CreateCounter("lookahead_model_cache_misses_total", "Compiled-model cache misses.");
        CacheEvictions = factory.CreateCounter("lookahead_model_cache_evictions_total", "Compiled models dropped from the cache, by reason.", "reason");
        CacheBytes = factory.CreateGauge("lookahead_model_cache_bytes", "Estimated bytes held by cached compiled models.");
        CacheEntries = factory.CreateGauge("lookahead_model_cache_entries", "Compiled models in the cache.");
        ReplayRows = factory.CreateCounter("lookahead_replay_rows_total", "Replay rows processed, by format and outcome.", "format", "outcome");
        Registrations = factory.CreateCounter("lookahead_model_registrations_total", "Registrations, by outcome (created, existing, rejected).", "outcome");
    }

    public CollectorRegistry Registry { get; }

    public Histogram PlanDuration { get; }

    public Counter Plans { get; }

    public Counter Compilations { get; }

    public Histogram CompileDuration { get; }

    public Counter CacheHits { get; }

    public Counter CacheMisses { get; }

    public Counter CacheEvictions { get; }

    public Gauge CacheBytes { get; }

    public Gauge CacheEntries { get; }

    public Counter ReplayRows { get; }

    public Counter Registrations { get; }
}
