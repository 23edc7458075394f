namespace Lookahead.Api.Storage;

/// <summary>
/// Durable home of registered models and aliases. Every write is acknowledged only once it is committed,
/// so a caller that saw success can rely on it surviving a crash.
/// </summary>
public interface IModelStore
{
    /// <summary>Stores the model unless one with the same id exists (ids are content hashes, so it is the same model).</summary>
    Task<PutOutcome> PutIfAbsentAsync(StoredModel model, CancellationToken cancellationToken);

    Task<StoredModel?> GetAsync(string id, CancellationToken cancellationToken);

    /// <summary>Summaries in registration order (stable under concurrent inserts, which only append).</summary>
    Task<ModelListing> ListAsync(int offset, int limit, CancellationToken cancellationToken);

    /// <summary>Deletes the model unless an alias points at it.</summary>
    Task<DeleteOutcome> DeleteAsync(string id, CancellationToken cancellationToken);

    /// <summary>Points the alias at the model and records the change in its history (no entry when the target is unchanged).</summary>
    Task<AliasOutcome> SetAliasAsync(string name, string modelId, DateTimeOffset at, CancellationToken cancellationToken);

    Task<AliasRecord?> GetAliasAsync(string name, CancellationToken cancellationToken);

    /// <summary>Deletes the alias and its history; false when it did not exist.</summary>
    Task<bool> DeleteAliasAsync(string name, CancellationToken cancellationToken);

    /// <summary>Throws when the store cannot be reached.</summary>
    Task PingAsync(CancellationToken cancellationToken);
}
