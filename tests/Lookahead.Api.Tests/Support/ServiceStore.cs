using Npgsql;

namespace Lookahead.Api.Tests.Support;

/// <summary>
/// A store that outlives the service processes started on it, so a test can kill one and start another on the same
/// data: a SQLite file in a temp folder, or a fresh PostgreSQL schema of its own (tests in parallel never share one).
/// Disposing removes it.
/// </summary>
public sealed class ServiceStore : IAsyncDisposable
{
    /// <summary>The Npgsql connection string tests/run.sh exports when it has started a PostgreSQL server.</summary>
    public const string PostgresVariable = "LOOKAHEAD_TEST_POSTGRES";

    private readonly Func<Task> remove;

    private ServiceStore(string description, IReadOnlyDictionary<string, string> settings, Func<Task> remove)
    {
        Description = description;
        Settings = settings;
        this.remove = remove;
    }

    /// <summary>What a failure message names: the file or the schema.</summary>
    public string Description { get; }

    /// <summary>The service's configuration keys (section:key) that point it at this store.</summary>
    public IReadOnlyDictionary<string, string> Settings { get; }

    public static ServiceStore Sqlite()
    {
        string folder = Directory.CreateTempSubdirectory("lookahead-process-store-").FullName;
        string database = Path.Combine(folder, "lookahead.db");
        var settings = new Dictionary<string, string> { ["Store:Provider"] = "sqlite", ["Store:SqlitePath"] = database };
        return new ServiceStore($"SQLite {database}", settings, () =>
        {
            Directory.Delete(folder, recursive: true);
            return Task.CompletedTask;
        });
    }

    /// <summary>A schema no other test uses, on the server named by <see cref="PostgresVariable"/>; the service creates its tables.</summary>
    public static ServiceStore Postgres()
    {
        string connectionString = Environment.GetEnvironmentVariable(PostgresVariable)
            ?? throw new InvalidOperationException($"{PostgresVariable} is not set");
        string schema = "process_" + Guid.NewGuid().ToString("N")[..12];
        var settings = new Dictionary<string, string>
        {
            ["Store:Provider"] = "postgres",
            ["Store:PostgresConnectionString"] = connectionString,
            ["Store:PostgresSchema"] = schema,
        };
        return new ServiceStore($"PostgreSQL schema {schema}", settings, async () =>
        {
            await using var connection = new NpgsqlConnection(connectionString);
            await connection.OpenAsync();
            await using var drop = new NpgsqlCommand($"DROP SCHEMA IF EXISTS \"{schema}\" CASCADE", connection);
            await drop.ExecuteNonQueryAsync();
        });
    }

    public async ValueTask DisposeAsync() => await remove();
}
