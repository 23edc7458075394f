using Lookahead.Api.Storage;
using Lookahead.Api.Tests.Support;
using Npgsql;

namespace Lookahead.Api.Tests.Storage;

/// <summary>The same contract against PostgreSQL, each test in a schema of its own (tests/run.sh starts a server).</summary>
[RequiresEnvironmentVariable("LOOKAHEAD_TEST_POSTGRES", "the PostgreSQL store contract needs a server; tests/run.sh starts one and sets this Npgsql connection string")]
public sealed class PostgresModelStoreTests : ModelStoreContract
{
    private readonly string schema = "contract_" + Guid.NewGuid().ToString("N")[..12];

    private static string ConnectionString => Environment.GetEnvironmentVariable("LOOKAHEAD_TEST_POSTGRES")!;

    protected override Task<IModelStore> CreateStoreAsync() =>
        Task.FromResult<IModelStore>(new PostgresModelStore(ConnectionString, schema));

    protected override async Task DropStoreAsync()
    {
        if (Store is IAsyncDisposable disposable)
        {
            await disposable.DisposeAsync();
        }

        await using var connection = new NpgsqlConnection(ConnectionString);
        await connection.OpenAsync();
        await using var drop = new NpgsqlCommand($"DROP SCHEMA IF EXISTS \"{schema}\" CASCADE", connection);
        await drop.ExecuteNonQueryAsync();
    }
}
