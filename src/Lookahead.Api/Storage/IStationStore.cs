namespace Lookahead.Api.Storage;

/// <summary>
/// Durable home of stations. Like <see cref="IModelStore"/>, every write is acknowledged only once it is committed.
/// Both stores implement it beside their model tables, on the same connection settings.
/// </summary>
public interface IStationStore
{
    /// <summary>Creates the station or replaces it (the binding and every piece of state); true when it was new.</summary>
    Task<bool> PutStationAsync(StationRecord station, CancellationToken cancellationToken);

    Task<StationRecord?> GetStationAsync(string name, CancellationToken cancellationToken);

    /// <summary>Stations in name order, a page at a time.</summary>
    Task<StationListing> ListStationsAsync(int offset, int limit, CancellationToken cancellationToken);

    /// <summary>False when there was no such station.</summary>
    Task<bool> DeleteStationAsync(string name, CancellationToken cancellationToken);

    /// <summary>
    /// Writes the state after a step, in one statement guarded by the sequence the step was computed from:
    /// false when the station's sequence is no longer <paramref name="expectedSequence"/> (another step won) or the
    /// station is gone. <paramref name="next"/> carries the new sequence.
    /// </summary>
    Task<bool> CommitStepAsync(StationRecord next, long expectedSequence, CancellationToken cancellationToken);
}
