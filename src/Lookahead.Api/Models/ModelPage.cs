namespace Lookahead.Api.Models;

/// <summary>One page of GET /v1/models, in registration order.</summary>
public sealed record ModelPage(IReadOnlyList<ModelSummary> Items, int Offset, int Limit, long Total);

public sealed record ModelSummary(string Id, string? Name, ModelDimensions Dimensions, DateTimeOffset RegisteredAt);
