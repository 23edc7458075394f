using Prometheus;

namespace Lookahead.Api.Catalog;

/// <summary>Registrations, compilations and the compiled-model cache, in the application's own registry.</summary>
public sealed class CatalogMetrics
{
    public CatalogMetrics(CollectorRegistry registry)
    {
        Registry = registry;
        var factory = Metrics.WithCustomRegistry(registry);
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
        CompilesRunning = factory.CreateGauge("lookahead_model_compiles_running", "Model compiles running now.");
        CompilesQueued = factory.CreateGauge("lookahead_model_compiles_queued", "Model compiles waiting for a free slot.");
        CompilesRefused = factory.CreateCounter("lookahead_model_compiles_refused_total", "Compiles refused or stopped by a budget, by reason (too_large, memory, queue, timeout).", "reason");
        CompilesAbandoned = factory.CreateCounter("lookahead_model_compiles_abandoned_total", "Compiles given up because the client left, by where they were (queued, running).", "stage");
        Registrations = factory.CreateCounter("lookahead_model_registrations_total", "Registrations, by outcome (created, existing, rejected).", "outcome");
    }

    public CollectorRegistry Registry { get; }

    public Counter Compilations { get; }

    public Histogram CompileDuration { get; }

    public Counter CacheHits { get; }

    public Counter CacheMisses { get; }

    public Counter CacheEvictions { get; }

    public Gauge CacheBytes { get; }

    public Gauge CacheEntries { get; }

    public Gauge CompilesRunning { get; }

    public Gauge CompilesQueued { get; }

    public Counter CompilesRefused { get; }

    public Counter CompilesAbandoned { get; }

    public Counter Registrations { get; }
}
