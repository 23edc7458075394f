namespace Lookahead.Api.Storage;

/// <summary>A registered model: its summary and the canonical document JSON its id hashes.</summary>
public sealed record StoredModel(StoredModelSummary Summary, byte[] Document)
{
    public string Id => Summary.Id;
}

/// <summary>What a listing needs without loading documents.</summary>
public sealed record StoredModelSummary(string Id, string? Name, int States, int Inputs, int Outputs, int Horizon, DateTimeOffset RegisteredAt)
{
    /// <summary>Reads columns 0–6 (id, name, states, inputs, outputs, horizon, registered_at) in the order both stores select them.</summary>
    public static StoredModelSummary Read(System.Data.Common.DbDataReader reader) => new(
        reader.GetString(0),
        reader.IsDBNull(1) ? null : reader.GetString(1),
        reader.GetInt32(2),
        reader.GetInt32(3),
        reader.GetInt32(4),
        reader.GetInt32(5),
        StoreTime.FromStored(reader.GetInt64(6)));
}

public sealed record ModelListing(IReadOnlyList<StoredModelSummary> Items, long Total);

public enum PutOutcome
{
    Created,
    Existing,
}
