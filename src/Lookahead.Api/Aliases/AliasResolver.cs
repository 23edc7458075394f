using System.Collections.Concurrent;
using Lookahead.Api.Catalog;
using Lookahead.Api.Storage;
using Microsoft.Extensions.Options;

namespace Lookahead.Api.Aliases;

/// <summary>
/// Alias → model id for planning, remembered for <see cref="CacheOptions.AliasSeconds"/>: within that time a plan reads
/// no store, so a re-pointed alias reaches other instances within it (this instance forgets at once, see
/// <see cref="Forget"/>). When the store cannot be reached, the last resolution this instance saw keeps answering,
/// however old, so plans by alias go on through an outage; the next successful read replaces it.
/// </summary>
public sealed class AliasResolver(IModelStore store, IOptions<CacheOptions> options, TimeProvider time, ILogger<AliasResolver> logger)
{
    private readonly ConcurrentDictionary<(string Tenant, string Name), Resolution> resolutions = new();
    private readonly TimeSpan lifetime = TimeSpan.FromSeconds(options.Value.AliasSeconds);

    /// <summary>The model id the tenant's alias points at, or null when the tenant has no such alias.</summary>
    public async Task<string?> ResolveAsync(string tenant, string name, CancellationToken cancellationToken)
    {
        var now = time.GetUtcNow();
        var key = (tenant, name);
        resolutions.TryGetValue(key, out var known);
        if (known is not null && now - known.ReadAt < lifetime)
        {
            return known.ModelId;
        }

        try
        {
            var alias = await store.GetAliasAsync(tenant, name, cancellationToken);
            if (alias is null)
            {
                resolutions.TryRemove(key, out _);
                return null;
            }

            // Only existing aliases are kept, so the table is bounded by the aliases there are.
            resolutions[key] = new Resolution(alias.ModelId, now);
            return alias.ModelId;
        }
        catch (StoreUnavailableException ex) when (known is not null)
        {
            logger.LogWarning(ex, "Store unavailable; alias {Alias} planned with its resolution from {ReadAt:o} ({ModelId})", name, known.ReadAt, known.ModelId);
            return known.ModelId;
        }
    }

    /// <summary>Drops what this instance knows of the alias, after it was set or deleted here.</summary>
    public void Forget(string tenant, string name) => resolutions.TryRemove((tenant, name), out _);

    private sealed record Resolution(string ModelId, DateTimeOffset ReadAt);
}
