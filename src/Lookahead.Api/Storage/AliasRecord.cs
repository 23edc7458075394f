namespace Lookahead.Api.Storage;

/// <summary>An alias, its current target, and every target it has had (oldest first).</summary>
public sealed record AliasRecord(string Name, string ModelId, DateTimeOffset UpdatedAt, IReadOnlyList<AliasChange> History);

/// <param name="ChangedBy">The id of the key that made the change; null when the service ran without keys (or for changes stored before keys were recorded).</param>
public sealed record AliasChange(string ModelId, DateTimeOffset SetAt, string? ChangedBy);

public enum AliasStatus
{
    Created,
    Updated,
    Unchanged,
    ModelNotFound,
}

public sealed record AliasOutcome(AliasStatus Status, AliasRecord? Alias);
