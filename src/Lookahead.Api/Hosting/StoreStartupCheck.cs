using Lookahead.Api.Storage;

namespace Lookahead.Api.Hosting;

/// <summary>
/// Stops the start when the SQLite store is read-only: a service that could plan but never register would look ready
/// and refuse every write, so it says why and exits instead. (An unreachable PostgreSQL is a passing state and does
/// not stop the start: readiness reports it and the service recovers when the server returns.)
/// </summary>
public sealed class StoreStartupCheck(IModelStore store) : IHostedService
{
    public Task StartAsync(CancellationToken cancellationToken)
    {
        var inner = store is StoreFaultBoundary boundary ? boundary.Inner : store;
        if (inner is SqliteModelStore sqlite)
        {
            sqlite.EnsureWritable();
        }

        return Task.CompletedTask;
    }

    public Task StopAsync(CancellationToken cancellationToken) => Task.CompletedTask;
}
