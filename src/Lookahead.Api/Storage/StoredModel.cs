namespace Lookahead.Api.Storage;

/// <summary>A registered model: its summary and the canonical document JSON its id hashes.</summary>
public sealed record StoredModel(StoredModelSummary Summary, byte[] Document)
{
    public string Id => Summary.Id;
}

/// <summary>What a listing needs without loading documents.</summary>
public sealed record StoredModelSummary(string Id, string? Name, int States, int Inputs, int Outputs, int Horizon, DateTimeOffset RegisteredAt);

public sealed record ModelListing(IReadOnlyList<StoredModelSummary> Items, long Total);

public enum PutOutcome
{
    Created,
    Existing,
}
