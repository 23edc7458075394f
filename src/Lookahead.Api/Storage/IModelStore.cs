namespace Lookahead.Api.Storage;

/// <summary>
/// Durable home of registered models and aliases. Every write is acknowledged only once it is committed,
/// so a caller that saw success can rely on it surviving a crash.
/// </summary>
/// <remarks>
/// Tenants: a model's content is stored once, and every tenant that registered it owns it; a tenant sees only the
/// models it owns and its own aliases. A null tenant reads across tenants (keys with the admin scope, and the
/// service's own bookkeeping). The default tenant is the empty string.
/// </remarks>
public interface IModelStore
{
    /// <summary>
    /// Stores the model unless one with the same id exists (ids are content hashes, so it is the same model), and
    /// makes the tenant an owner: <see cref="PutOutcome.Created"/> when the tenant did not own it before, whoever else did.
    /// </summary>
    Task<PutOutcome> PutIfAbsentAsync(string tenant, StoredModel model, CancellationToken cancellationToken);

    /// <summary>The model if the tenant owns it (any owner's when <paramref name="tenant"/> is null), with the tenant's registration time.</summary>
    Task<StoredModel?> GetAsync(string? tenant, string id, CancellationToken cancellationToken);

    /// <summary>The tenant's models in its registration order (every model when null); stable under concurrent inserts, which only append.</summary>
    Task<ModelListing> ListAsync(string? tenant, int offset, int limit, CancellationToken cancellationToken);

    /// <summary>
    /// Ends the tenant's ownership unless one of its aliases points at the model; the content goes when no tenant owns
    /// it any more.
    /// </summary>
    Task<DeleteOutcome> DeleteAsync(string tenant, string id, CancellationToken cancellationToken);

    /// <summary>
    /// Points the tenant's alias at a model the tenant owns and records the change, with the key that made it, in the
    /// alias's history (no entry when the target is unchanged).
    /// </summary>
    Task<AliasOutcome> SetAliasAsync(string tenant, string name, string modelId, DateTimeOffset at, string? changedBy, CancellationToken cancellationToken);

    Task<AliasRecord?> GetAliasAsync(string tenant, string name, CancellationToken cancellationToken);

    /// <summary>The tenant's aliases ordered by name (ordinal), a page at a time, with the tenant's total; other tenants' aliases never appear.</summary>
    Task<AliasListing> ListAliasesAsync(string tenant, int offset, int limit, CancellationToken cancellationToken);

    /// <summary>Deletes the alias and its history; false when it did not exist.</summary>
    Task<bool> DeleteAliasAsync(string tenant, string name, CancellationToken cancellationToken);

    /// <summary>Throws when the store cannot be reached.</summary>
    Task PingAsync(CancellationToken cancellationToken);
}
