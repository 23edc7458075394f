namespace Lookahead.Client;

/// <summary>An alias, its current target and every target it had, oldest first.</summary>
public sealed record AliasDetails(string Name, string ModelId, DateTimeOffset UpdatedAt, IReadOnlyList<AliasHistoryEntry> History);

/// <summary>One target an alias had; <see cref="ChangedBy"/> is the id of the key that set it.</summary>
public sealed record AliasHistoryEntry(string ModelId, DateTimeOffset SetAt, string? ChangedBy);
