namespace Lookahead.Api.Storage;

/// <summary>
/// What one applied step writes, in one transaction: the station's new state, guarded by the sequence and model it
/// was computed from, and the step's entry in the station's history, trimmed to the newest
/// <paramref name="HistoryLength"/> entries.
/// </summary>
/// <param name="Next">The station after the step (it carries the new sequence and the model id the step used).</param>
/// <param name="ExpectedSequence">The sequence the step was computed from.</param>
/// <param name="ExpectedModelId">The model id the station held when the step read it.</param>
/// <param name="Entry">The history entry; null when no history is kept.</param>
public sealed record StationCommit(StationRecord Next, long ExpectedSequence, string ExpectedModelId, StationStepLog? Entry, int HistoryLength);

/// <summary>One step in a station's history: the request and the answer as JSON text, kept byte for byte.</summary>
/// <param name="Sequence">The sequence the step carried.</param>
public sealed record StationStepLog(string Name, long Sequence, DateTimeOffset SteppedAt, string Request, string Answer)
{
    /// <summary>The columns <see cref="Read"/> expects, in its order.</summary>
    internal const string Columns = "name, sequence, stepped_at, request, answer";

    internal static StationStepLog Read(System.Data.Common.DbDataReader reader) => new(
        reader.GetString(0), reader.GetInt64(1), StoreTime.FromStored(reader.GetInt64(2)), reader.GetString(3), reader.GetString(4));
}
