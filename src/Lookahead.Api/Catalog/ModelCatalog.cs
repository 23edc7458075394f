using Lookahead.Api.Http;
using Lookahead.Api.Storage;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;
using Microsoft.AspNetCore.Http.Json;
using Microsoft.Extensions.Options;

namespace Lookahead.Api.Catalog;

/// <summary>
/// Registered models: validation, canonical id, durable storage and the compiled-model cache behind one API.
/// A registration is acknowledged only after the store has committed it.
/// </summary>
public sealed class ModelCatalog(
    IModelStore store,
    CompiledModelCache cache,
    IOptions<JsonOptions> json,
    IOptions<RequestLimitsOptions> limits,
    CatalogMetrics metrics,
    TimeProvider time,
    IOptions<CacheOptions> cacheOptions)
{
    private readonly System.Collections.Concurrent.ConcurrentDictionary<string, long> confirmed = new(StringComparer.Ordinal);

    public async Task<RegistrationResult> RegisterAsync(ModelDocumentDto dto, CancellationToken cancellationToken)
    {
        var normalised = ModelDocumentMapping.Normalise(dto);
        var errors = new List<ValidationError>();
        var document = ModelDocumentMapping.ToCore(normalised, errors);
        if (errors.Count == 0)
        {
            errors.AddRange(ModelValidator.Validate(document, limits.Value.ToSizeLimits()));
        }

        if (errors.Count > 0)
        {
            metrics.Registrations.WithLabels("rejected").Inc();
            return RegistrationResult.Rejected(errors);
        }

        var canonical = CanonicalModel.From(normalised, json.Value.SerializerOptions);
        if (!cache.TryGet(canonical.Id, out var model))
        {
            try
            {
                // Compiled from the canonical form, exactly as a restart will recompile it.
                // The client's token: a registration whose client left is not compiled, or stops compiling.
                model = await cache.CompileAsync(canonical.Document, cancellationToken);
            }
            catch (ModelValidationException ex)
            {
                metrics.Registrations.WithLabels("rejected").Inc();
                return RegistrationResult.Rejected(ex.Errors);
            }
        }

        var summary = new StoredModelSummary(canonical.Id, canonical.Dto.Name, model.StateCount, model.InputCount, model.OutputCount, model.Horizon, time.GetUtcNow());
        var outcome = await store.PutIfAbsentAsync(new StoredModel(summary, canonical.Json), cancellationToken);
        cache.Add(canonical.Id, model);
        metrics.Registrations.WithLabels(outcome == PutOutcome.Created ? "created" : "existing").Inc();
        return new RegistrationResult(canonical.Id, model, outcome == PutOutcome.Created, []);
    }

    /// <summary>The compiled model, from the cache or recompiled from the store; null when no such model is registered.</summary>
    public async Task<CompiledModel?> GetCompiledAsync(string id)
    {
        if (cache.TryGet(id, out var cached))
        {
            return await StillRegisteredAsync(id) ? cached : null;
        }

        var model = await LoadAsync(id);
        if (model is not null)
        {
            confirmed[id] = time.GetTimestamp();
        }

        return model;
    }

    /// <summary>
    /// Whether a cached model is still in the store, asked at most every Cache:ModelSeconds: another instance may have
    /// deleted it. Only the first request after the interval asks; a store that cannot answer leaves the model in use.
    /// </summary>
    private async Task<bool> StillRegisteredAsync(string id)
    {
        long now = time.GetTimestamp();
        long interval = cacheOptions.Value.ModelSeconds * time.TimestampFrequency;
        if (confirmed.TryGetValue(id, out long at) && now - at < interval)
        {
            return true;
        }

        confirmed[id] = now;
        try
        {
            if (await store.GetAsync(id, CancellationToken.None) is not null)
            {
                return true;
            }
        }
        catch (StoreUnavailableException)
        {
            return true;
        }

        cache.Remove(id);
        confirmed.TryRemove(id, out _);
        return false;
    }

    private Task<CompiledModel?> LoadAsync(string id) =>
        cache.GetOrCompileAsync(id, async () =>
        {
            // Not the caller's token: other requests may be waiting on this same load.
            var stored = await store.GetAsync(id, CancellationToken.None);
            return stored is null ? null : CanonicalModel.Parse(stored.Document, json.Value.SerializerOptions).Document;
        });

    public async Task<(StoredModel Stored, CanonicalModel Canonical)?> GetStoredAsync(string id, CancellationToken cancellationToken)
    {
        var stored = await store.GetAsync(id, cancellationToken);
        return stored is null ? null : (stored, CanonicalModel.Parse(stored.Document, json.Value.SerializerOptions));
    }

    public Task<ModelListing> ListAsync(int offset, int limit, CancellationToken cancellationToken) =>
        store.ListAsync(offset, limit, cancellationToken);

    public async Task<DeleteOutcome> DeleteAsync(string id, CancellationToken cancellationToken)
    {
        var outcome = await store.DeleteAsync(id, cancellationToken);
        if (outcome.Status == DeleteStatus.Deleted)
        {
            cache.Remove(id);
        }

        return outcome;
    }

    /// <summary>Drops a compiled model from the cache (the stored document stays); the next use recompiles it.</summary>
    public void Evict(string id) => cache.Remove(id);
}
