namespace Lookahead.Api.Storage;

/// <summary>An alias, its current target, and every target it has had (oldest first).</summary>
public sealed record AliasRecord(string Name, string ModelId, DateTimeOffset UpdatedAt, IReadOnlyList<AliasChange> History);

public sealed record AliasChange(string ModelId, DateTimeOffset SetAt);

public enum AliasStatus
{
    Created,
    Updated,
    Unchanged,
    ModelNotFound,
}

public sealed record AliasOutcome(AliasStatus Status, AliasRecord? Alias);
