using Lookahead.Api.Http;
using Lookahead.Api.Storage;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;
using Microsoft.AspNetCore.Http.Json;
using Microsoft.Extensions.Options;

namespace Lookahead.Api.Catalog;

/// <summary>
/// Registered models: validation, canonical id, durable storage and the compiled-model cache behind one API.
/// A registration is acknowledged only after the store has committed it. Every read is on behalf of a tenant, which
/// sees only the models it registered; compiled models are shared, since equal ids are equal content.
/// </summary>
public sealed class ModelCatalog(
    IModelStore store,
    CompiledModelCache cache,
    IOptions<JsonOptions> json,
    IOptions<RequestLimitsOptions> limits,
    CatalogMetrics metrics,
    TimeProvider time,
    IOptions<CacheOptions> cacheOptions,
    RegistrationIntake intake)
{
    /// <summary>Stands for "any tenant" among the confirmations; not a well-formed tenant name, so no tenant's own.</summary>
    private const string AnyTenant = "*";

    private readonly System.Collections.Concurrent.ConcurrentDictionary<(string Tenant, string Id), long> confirmed = new();

    /// <summary>
    /// Validates, compiles and stores the model for the tenant. "Created" means new to this tenant, whoever else holds
    /// the same content, so a registration tells nothing about other tenants' models.
    /// </summary>
    public async Task<RegistrationResult> RegisterAsync(string tenant, ModelDocumentDto dto, CancellationToken cancellationToken)
    {
        CanonicalModel canonical;
        using (await intake.EnterAsync(cancellationToken))
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

            canonical = CanonicalModel.From(normalised, json.Value.SerializerOptions);
        }

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
        var outcome = await store.PutIfAbsentAsync(tenant, new StoredModel(summary, canonical.Json), cancellationToken);
        cache.Add(canonical.Id, model);
        confirmed[(tenant, canonical.Id)] = time.GetTimestamp();
        metrics.Registrations.WithLabels(outcome == PutOutcome.Created ? "created" : "existing").Inc();
        return new RegistrationResult(canonical.Id, model, outcome == PutOutcome.Created, []);
    }

    /// <summary>
    /// The compiled model, from the cache or recompiled from the store; null when the tenant has no such model (a null
    /// tenant: when no tenant has).
    /// </summary>
    public async Task<CompiledModel?> GetCompiledAsync(string? tenant, string id)
    {
        if (cache.TryGet(id, out var cached))
        {
            return await StillRegisteredAsync(tenant, id) ? cached : null;
        }

        var model = await LoadAsync(tenant, id);
        if (model is not null)
        {
            confirmed[(tenant ?? AnyTenant, id)] = time.GetTimestamp();
        }

        return model;
    }

    /// <summary>
    /// Whether a cached model is still in the store, asked at most every Cache:ModelSeconds: another instance may have
    /// deleted it. Only the first request after the interval asks; a store that cannot answer leaves the model in use.
    /// </summary>
    private async Task<bool> StillRegisteredAsync(string? tenant, string id)
    {
        long now = time.GetTimestamp();
        long interval = cacheOptions.Value.ModelSeconds * time.TimestampFrequency;
        var key = (tenant ?? AnyTenant, id);
        if (confirmed.TryGetValue(key, out long at) && now - at < interval)
        {
            return true;
        }

        try
        {
            if (await store.GetAsync(tenant, id, CancellationToken.None) is not null)
            {
                confirmed[key] = now;
                return true;
            }
        }
        catch (StoreUnavailableException)
        {
            // Only what this instance confirmed before the outage keeps planning: a tenant never gains a model by it.
            return confirmed.ContainsKey(key);
        }

        confirmed.TryRemove(key, out _);

        // Gone for everyone, or only not this tenant's: the compiled model goes only when no tenant has it, so another
        // tenant's probe of an id does not make its owner recompile.
        if (tenant is null || await store.GetAsync(null, id, CancellationToken.None) is null)
        {
            cache.Remove(id);
        }

        return false;
    }

    private async Task<CompiledModel?> LoadAsync(string? tenant, string id)
    {
        // Not the caller's token: other requests may be waiting on this same load.
        var stored = await store.GetAsync(tenant, id, CancellationToken.None);
        return stored is null
            ? null
            : await cache.GetOrCompileAsync(id, () => Task.FromResult<Lookahead.Core.Models.ModelDocument?>(CanonicalModel.Parse(stored.Document, json.Value.SerializerOptions).Document));
    }

    public async Task<(StoredModel Stored, CanonicalModel Canonical)?> GetStoredAsync(string? tenant, string id, CancellationToken cancellationToken)
    {
        var stored = await store.GetAsync(tenant, id, cancellationToken);
        return stored is null ? null : (stored, CanonicalModel.Parse(stored.Document, json.Value.SerializerOptions));
    }

    public Task<ModelListing> ListAsync(string? tenant, int offset, int limit, CancellationToken cancellationToken) =>
        store.ListAsync(tenant, offset, limit, cancellationToken);

    /// <summary>Ends the tenant's ownership; the compiled model leaves the cache when no tenant holds the content any more.</summary>
    public async Task<DeleteOutcome> DeleteAsync(string tenant, string id, CancellationToken cancellationToken)
    {
        var outcome = await store.DeleteAsync(tenant, id, cancellationToken);
        if (outcome.Status == DeleteStatus.Deleted)
        {
            confirmed.TryRemove((tenant, id), out _);
            if (await store.GetAsync(null, id, cancellationToken) is null)
            {
                cache.Remove(id);
            }
        }

        return outcome;
    }

    /// <summary>Drops a compiled model from the cache (the stored document stays); the next use recompiles it.</summary>
    public void Evict(string id) => cache.Remove(id);
}
