namespace Lookahead.Api.Storage;

/// <summary>
/// Durable home of stations. Like <see cref="IModelStore"/>, every write is acknowledged only once it is committed.
/// Both stores implement it beside their model tables, on the same connection settings. Stations are named within a
/// tenant (<see cref="StationRecord.Tenant"/>); a null tenant lists across tenants.
/// </summary>
public interface IStationStore
{
    /// <summary>Creates the station or replaces it (the binding, every piece of state and its history); true when it was new.</summary>
    Task<bool> PutStationAsync(StationRecord station, CancellationToken cancellationToken);

    Task<StationRecord?> GetStationAsync(string tenant, string name, CancellationToken cancellationToken);

    /// <summary>The tenant's stations in name order (every tenant's, by tenant and name, when null), a page at a time.</summary>
    Task<StationListing> ListStationsAsync(string? tenant, int offset, int limit, CancellationToken cancellationToken);

    /// <summary>Deletes the station and its history; false when there was no such station.</summary>
    Task<bool> DeleteStationAsync(string tenant, string name, CancellationToken cancellationToken);

    /// <summary>
    /// Writes the state after a step and its history entry, in one transaction guarded by the sequence and model the
    /// step was computed from: false (and nothing written) when the station's sequence or model moved meanwhile
    /// (another step won, or the station was re-bound) or the station is gone. Acknowledged only once committed.
    /// </summary>
    Task<bool> CommitStepAsync(StationCommit commit, CancellationToken cancellationToken);

    /// <summary>The newest <paramref name="limit"/> steps of a station's history, oldest first.</summary>
    Task<IReadOnlyList<StationStepLog>> GetStepsAsync(string tenant, string name, int limit, CancellationToken cancellationToken);
}
