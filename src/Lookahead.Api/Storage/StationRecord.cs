using System.Data.Common;

namespace Lookahead.Api.Storage;

/// <summary>
/// A station as stored: its model binding, its step counter and the estimator state carried between steps. The
/// vectors and the last answer are JSON text written by the Stations feature; the store keeps them byte for byte and
/// never reads inside them.
/// </summary>
/// <param name="Name">The key.</param>
/// <param name="ModelReference">The model as the client gave it: a model id or an alias name.</param>
/// <param name="ModelId">The model id the reference resolved to at the last step (or when the station was bound).</param>
/// <param name="Detail">What a step answers with: "first-move" or "full".</param>
/// <param name="Sequence">The sequence the next step must carry (0 for a new station; +1 per applied step).</param>
/// <param name="StepCount">Steps applied since the station was bound.</param>
/// <param name="Estimate">{ state, disturbance } after the last step; null before the first.</param>
/// <param name="LastAppliedInput">The input the last step took as applied (JSON array); null before the first.</param>
/// <param name="LastFirstMove">The first move the last step suggested (JSON array); null before the first and after a track step.</param>
/// <param name="LastRequestHash">SHA-256 of the last applied step's canonical body, so an identical retry is recognised.</param>
/// <param name="LastAnswer">The last applied step's answer (JSON), returned again to an identical retry.</param>
/// <param name="LastTimestamp">The plant time the last step gave; null when it gave none.</param>
/// <param name="UpdatedAt">When the station was bound or last stepped.</param>
public sealed record StationRecord(
    string Name,
    string ModelReference,
    string ModelId,
    string Detail,
    long Sequence,
    long StepCount,
    string? Estimate,
    string? LastAppliedInput,
    string? LastFirstMove,
    string? LastRequestHash,
    string? LastAnswer,
    DateTimeOffset? LastTimestamp,
    DateTimeOffset UpdatedAt)
{
    /// <summary>The tenant the station's name belongs to (the default tenant is the empty string).</summary>
    public string Tenant { get; init; } = "";

    /// <summary>The columns <see cref="Read"/> expects, in its order (both stores select them so).</summary>
    internal const string Columns =
        "name, model_reference, model_id, detail, sequence, step_count, estimate, last_applied_input, last_first_move, last_request_hash, last_answer, last_timestamp, updated_at, tenant";

    internal static StationRecord Read(DbDataReader reader)
    {
        string? Text(int i) => reader.IsDBNull(i) ? null : reader.GetString(i);
        return new StationRecord(
            reader.GetString(0),
            reader.GetString(1),
            reader.GetString(2),
            reader.GetString(3),
            reader.GetInt64(4),
            reader.GetInt64(5),
            Text(6),
            Text(7),
            Text(8),
            Text(9),
            Text(10),
            reader.IsDBNull(11) ? null : StoreTime.FromTicks(reader.GetInt64(11)),
            StoreTime.FromStored(reader.GetInt64(12)))
        {
            Tenant = reader.GetString(13),
        };
    }
}

/// <summary>One page of stations in name order, with the total.</summary>
public sealed record StationListing(IReadOnlyList<StationRecord> Items, long Total);
