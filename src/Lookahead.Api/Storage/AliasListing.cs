namespace Lookahead.Api.Storage;

/// <summary>One alias in a listing: its name, current target and when it was last pointed (history stays with the alias).</summary>
public sealed record AliasSummaryRecord(string Name, string ModelId, DateTimeOffset UpdatedAt);

/// <summary>A page of one tenant's aliases, by name, and how many the tenant has.</summary>
public sealed record AliasListing(IReadOnlyList<AliasSummaryRecord> Items, long Total);
