using System.Collections.Concurrent;
using System.Diagnostics;
using System.Diagnostics.CodeAnalysis;
using Lookahead.Api.Http;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Microsoft.Extensions.Caching.Memory;
using Microsoft.Extensions.Options;

namespace Lookahead.Api.Catalog;

/// <summary>
/// Compiled models by id, bounded in bytes (each entry weighs the core's own estimate), least recently used
/// first out. A model missing from the cache is compiled once however many requests ask for it at the same time.
/// </summary>
public sealed class CompiledModelCache : IDisposable
{
    private readonly MemoryCache cache;
    private readonly ConcurrentDictionary<string, Lazy<Task<CompiledModel?>>> inFlight = new(StringComparer.Ordinal);
    private readonly CatalogMetrics metrics;
    private readonly CompileOptions compileOptions;
    private readonly CompileBudget budget;
    private readonly ILogger<CompiledModelCache> logger;
    private readonly long sizeLimit;

    public CompiledModelCache(IOptions<CacheOptions> options, IOptions<RequestLimitsOptions> limits, IOptions<PlanningOptions> planning, CompileBudget budget, CatalogMetrics metrics, ILogger<CompiledModelCache> logger)
    {
        this.budget = budget;
        sizeLimit = options.Value.SizeLimitBytes;
        cache = new MemoryCache(new MemoryCacheOptions { SizeLimit = sizeLimit, TrackStatistics = true, CompactionPercentage = 0.1 });
        compileOptions = new CompileOptions { SizeLimits = limits.Value.ToSizeLimits(), MaxSolverIterations = planning.Value.MaxSolverIterations };
        this.metrics = metrics;
        this.logger = logger;
        metrics.Registry.AddBeforeCollectCallback(() =>
        {
            var statistics = cache.GetCurrentStatistics();
            metrics.CacheBytes.Set(statistics?.CurrentEstimatedSize ?? 0);
            metrics.CacheEntries.Set(statistics?.CurrentEntryCount ?? 0);
        });
    }

    public CompileOptions CompileOptions => compileOptions;

    public bool TryGet(string id, [NotNullWhen(true)] out CompiledModel? model)
    {
        if (cache.TryGetValue(id, out object? value) && value is CompiledModel found)
        {
            metrics.CacheHits.Inc();
            model = found;
            return true;
        }

        model = null;
        return false;
    }

    /// <summary>
    /// Compiles within the compile budgets and counts; throws the core's validation exception unchanged, and
    /// <see cref="CompileRefusedException"/> when a budget is spent.
    /// </summary>
    public async Task<CompiledModel> CompileAsync(ModelDocument document, CancellationToken cancellationToken)
    {
        long started = Stopwatch.GetTimestamp();
        var model = await budget.RunAsync(document, compileOptions, cancellationToken);
        metrics.Compilations.Inc();
        metrics.CompileDuration.Observe(Stopwatch.GetElapsedTime(started).TotalSeconds);
        return model;
    }

    public void Add(string id, CompiledModel model)
    {
        long size = model.EstimatedBytes;
        if (size > sizeLimit)
        {
            logger.LogWarning("Model {ModelId} needs {Bytes} bytes, more than the whole cache ({Limit}); it will be compiled on every use", id, size, sizeLimit);
            return;
        }

        // Make room first, least recently used out one at a time, so the new entry is not the one refused.
        // (MemoryCache.Compact counts entries, not bytes: 1.5/count removes exactly one.)
        for (var statistics = cache.GetCurrentStatistics(); statistics is { CurrentEntryCount: > 0 } && statistics.CurrentEstimatedSize + size > sizeLimit; statistics = cache.GetCurrentStatistics())
        {
            cache.Compact(Math.Min(1.0, 1.5 / statistics.CurrentEntryCount));
        }

        var entry = new MemoryCacheEntryOptions { Size = size };
        entry.RegisterPostEvictionCallback(OnEvicted);
        cache.Set(id, model, entry);
    }

    public void Remove(string id) => cache.Remove(id);

    /// <summary>
    /// The cached model, or the one <paramref name="load"/> yields compiled; concurrent callers for the same id
    /// share one load-and-compile. Null when <paramref name="load"/> finds nothing.
    /// </summary>
    public async Task<CompiledModel?> GetOrCompileAsync(string id, Func<Task<ModelDocument?>> load)
    {
        if (TryGet(id, out var cached))
        {
            return cached;
        }

        metrics.CacheMisses.Inc();
        var mine = new Lazy<Task<CompiledModel?>>(() => LoadAndCompileAsync(id, load), LazyThreadSafetyMode.ExecutionAndPublication);
        var winner = inFlight.GetOrAdd(id, mine);
        if (!ReferenceEquals(winner, mine))
        {
            return await winner.Value;
        }

        try
        {
            return await mine.Value;
        }
        finally
        {
            inFlight.TryRemove(new KeyValuePair<string, Lazy<Task<CompiledModel?>>>(id, mine));
        }
    }

    public void Dispose() => cache.Dispose();

    private async Task<CompiledModel?> LoadAndCompileAsync(string id, Func<Task<ModelDocument?>> load)
    {
        // A caller that lost the race with a finished compile finds the entry here instead of compiling again.
        if (cache.TryGetValue(id, out object? value) && value is CompiledModel already)
        {
            return already;
        }

        var document = await load();
        if (document is null)
        {
            return null;
        }

        // Not a caller's token: other requests may be waiting on this same compile; only its time budget stops it.
        var model = await CompileAsync(document, CancellationToken.None);
        Add(id, model);
        return model;
    }

    private void OnEvicted(object key, object? value, EvictionReason reason, object? state)
    {
        switch (reason)
        {
            case EvictionReason.Capacity:
                metrics.CacheEvictions.WithLabels("capacity").Inc();
                break;
            case EvictionReason.Removed:
                metrics.CacheEvictions.WithLabels("removed").Inc();
                break;
            case EvictionReason.Expired or EvictionReason.TokenExpired:
                metrics.CacheEvictions.WithLabels("expired").Inc();
                break;
        }
    }
}
