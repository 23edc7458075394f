using System.Net.Sockets;
using Microsoft.Data.Sqlite;
using Npgsql;

namespace Lookahead.Api.Storage;

/// <summary>
/// Wraps the configured store so that every failure to reach or write it leaves as a
/// <see cref="StoreUnavailableException"/> (answered 503 with Retry-After), whichever provider raised it. Errors that
/// say the service itself is wrong (a bad statement, a violated constraint) pass through unchanged and stay 500s.
/// </summary>
public sealed class StoreFaultBoundary(IModelStore inner) : IModelStore, IStationStore, IAsyncDisposable, IDisposable
{
    private readonly IStationStore stations = (IStationStore)inner;

    public IModelStore Inner => inner;

    public Task<PutOutcome> PutIfAbsentAsync(string tenant, StoredModel model, CancellationToken cancellationToken) =>
        GuardAsync(() => inner.PutIfAbsentAsync(tenant, model, cancellationToken));

    public Task<StoredModel?> GetAsync(string? tenant, string id, CancellationToken cancellationToken) => GuardAsync(() => inner.GetAsync(tenant, id, cancellationToken));

    public Task<ModelListing> ListAsync(string? tenant, int offset, int limit, CancellationToken cancellationToken) =>
        GuardAsync(() => inner.ListAsync(tenant, offset, limit, cancellationToken));

    public Task<DeleteOutcome> DeleteAsync(string tenant, string id, CancellationToken cancellationToken) => GuardAsync(() => inner.DeleteAsync(tenant, id, cancellationToken));

    public Task<AliasOutcome> SetAliasAsync(string tenant, string name, string modelId, DateTimeOffset at, string? changedBy, CancellationToken cancellationToken) =>
        GuardAsync(() => inner.SetAliasAsync(tenant, name, modelId, at, changedBy, cancellationToken));

    public Task<AliasRecord?> GetAliasAsync(string tenant, string name, CancellationToken cancellationToken) => GuardAsync(() => inner.GetAliasAsync(tenant, name, cancellationToken));

    public Task<AliasListing> ListAliasesAsync(string tenant, int offset, int limit, CancellationToken cancellationToken) =>
        GuardAsync(() => inner.ListAliasesAsync(tenant, offset, limit, cancellationToken));

    public Task<bool> DeleteAliasAsync(string tenant, string name, CancellationToken cancellationToken) => GuardAsync(() => inner.DeleteAliasAsync(tenant, name, cancellationToken));

    public Task PingAsync(CancellationToken cancellationToken) => GuardAsync(async () =>
    {
        await inner.PingAsync(cancellationToken);
        return true;
    });

    public Task<bool> PutStationAsync(StationRecord station, CancellationToken cancellationToken) => GuardAsync(() => stations.PutStationAsync(station, cancellationToken));

    public Task<StationRecord?> GetStationAsync(string tenant, string name, CancellationToken cancellationToken) =>
        GuardAsync(() => stations.GetStationAsync(tenant, name, cancellationToken));

    public Task<StationListing> ListStationsAsync(string? tenant, int offset, int limit, CancellationToken cancellationToken) =>
        GuardAsync(() => stations.ListStationsAsync(tenant, offset, limit, cancellationToken));

    public Task<bool> DeleteStationAsync(string tenant, string name, CancellationToken cancellationToken) =>
        GuardAsync(() => stations.DeleteStationAsync(tenant, name, cancellationToken));

    public Task<bool> CommitStepAsync(StationCommit commit, CancellationToken cancellationToken) => GuardAsync(() => stations.CommitStepAsync(commit, cancellationToken));

    public Task<IReadOnlyList<StationStepLog>> GetStepsAsync(string tenant, string name, int limit, CancellationToken cancellationToken) =>
        GuardAsync(() => stations.GetStepsAsync(tenant, name, limit, cancellationToken));

    public async ValueTask DisposeAsync()
    {
        switch (inner)
        {
            case IAsyncDisposable asyncDisposable:
                await asyncDisposable.DisposeAsync();
                break;
            case IDisposable disposable:
                disposable.Dispose();
                break;
        }
    }

    public void Dispose() => DisposeAsync().AsTask().GetAwaiter().GetResult();

    /// <summary>True when <paramref name="exception"/> means the store cannot be reached or written now, rather than a fault of the service.</summary>
    public static bool IsUnavailable(Exception exception) => exception switch
    {
        StoreUnavailableException => true,

        // Server-side errors are faults of the statement unless PostgreSQL marks them transient (shutting down, too many connections).
        PostgresException postgres => postgres.IsTransient,

        // Client-side Npgsql errors are about the connection: refused, reset, timed out, pool exhausted.
        NpgsqlException => true,
        SocketException or TimeoutException => true,

        // busy, locked, read-only, I/O error, corrupt, disk full, cannot open, not a database.
        SqliteException sqlite => (sqlite.SqliteErrorCode & 0xFF) is 5 or 6 or 8 or 10 or 11 or 13 or 14 or 26,

        // Inside a store call these come from the file system (a folder that cannot be created, a file without rights).
        IOException or UnauthorizedAccessException => true,
        _ => false,
    };

    private async Task<T> GuardAsync<T>(Func<Task<T>> call)
    {
        try
        {
            return await call();
        }
        catch (Exception ex) when (ex is not StoreUnavailableException && IsUnavailable(ex))
        {
            if (inner is PostgresModelStore postgres)
            {
                // Pooled connections may be dead after a server restart; none is handed out again.
                postgres.ClearPool();
            }

            throw new StoreUnavailableException("The model store cannot be reached or written now; retry after the interval in Retry-After.", ex);
        }
    }
}
