namespace Lookahead.Api.Aliases;

/// <summary>Body of PUT /v1/aliases/{name}.</summary>
public sealed record AliasRequest(string? ModelId);

/// <summary>An alias, its current target and every target it had, oldest first.</summary>
public sealed record AliasResponse(string Name, string ModelId, DateTimeOffset UpdatedAt, IReadOnlyList<AliasHistoryEntry> History);

/// <param name="ChangedBy">The id of the key that made the change (the first 12 hex digits of its hash); null when the service ran without keys.</param>
public sealed record AliasHistoryEntry(string ModelId, DateTimeOffset SetAt, string? ChangedBy);

/// <summary>One page of GET /v1/aliases: the tenant's aliases by name.</summary>
public sealed record AliasPage(IReadOnlyList<AliasSummary> Items, int Offset, int Limit, long Total);

/// <summary>An alias in a listing; GET /v1/aliases/{name} has its history.</summary>
public sealed record AliasSummary(string Name, string ModelId, DateTimeOffset UpdatedAt);
