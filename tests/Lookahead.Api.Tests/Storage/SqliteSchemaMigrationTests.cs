using Lookahead.Api.Storage;
using Microsoft.Data.Sqlite;

namespace Lookahead.Api.Tests.Storage;

public sealed class SqliteSchemaMigrationTests : SchemaMigrationContract
{
    /// <summary>The tables as stores created them before schema versions were recorded, statement for statement.</summary>
    private const string PreviousSchema = """
        PRAGMA journal_mode = WAL; PRAGMA synchronous = FULL;
        CREATE TABLE IF NOT EXISTS models (
            seq INTEGER PRIMARY KEY AUTOINCREMENT,
            id TEXT NOT NULL UNIQUE,
            name TEXT,
            document BLOB NOT NULL,
            states INTEGER NOT NULL,
            inputs INTEGER NOT NULL,
            outputs INTEGER NOT NULL,
            horizon INTEGER NOT NULL,
            registered_at INTEGER NOT NULL);
        CREATE TABLE IF NOT EXISTS aliases (
            name TEXT PRIMARY KEY,
            model_id TEXT NOT NULL REFERENCES models(id),
            updated_at INTEGER NOT NULL);
        CREATE INDEX IF NOT EXISTS aliases_model ON aliases(model_id);
        CREATE TABLE IF NOT EXISTS alias_history (
            seq INTEGER PRIMARY KEY AUTOINCREMENT,
            name TEXT NOT NULL,
            model_id TEXT NOT NULL,
            set_at INTEGER NOT NULL);
        CREATE INDEX IF NOT EXISTS alias_history_name ON alias_history(name, seq);
        """;

    private readonly string folder = Directory.CreateTempSubdirectory("lookahead-sqlite-migrations-").FullName;

    private string FilePath => Path.Combine(folder, "store.db");

    private protected override MigrationSequence ShippedMigrations => SqliteMigrations.Sequence;

    private protected override IModelStore CreateStore(MigrationSequence? migrations) =>
        new SqliteModelStore(FilePath, migrations ?? SqliteMigrations.Sequence);

    protected override async Task ExecuteAsync(string sql)
    {
        await using var connection = await OpenAsync();
        await using var command = connection.CreateCommand();
        command.CommandText = sql;
        await command.ExecuteNonQueryAsync();
    }

    protected override Task CreatePreviousSchemaAsync() => ExecuteAsync(PreviousSchema);

    protected override string BinaryLiteral(byte[] bytes) => $"X'{Convert.ToHexString(bytes)}'";

    protected override async Task<IReadOnlyList<(long Version, string Name)>> RecordedVersionsAsync()
    {
        if (!await TableExistsAsync("schema_migrations"))
        {
            return [];
        }

        await using var connection = await OpenAsync();
        await using var command = connection.CreateCommand();
        command.CommandText = "SELECT version, name FROM schema_migrations ORDER BY version";
        await using var reader = await command.ExecuteReaderAsync();
        var rows = new List<(long, string)>();
        while (await reader.ReadAsync())
        {
            rows.Add((reader.GetInt64(0), reader.GetString(1)));
        }

        return rows;
    }

    protected override async Task<bool> TableExistsAsync(string table)
    {
        await using var connection = await OpenAsync();
        await using var command = connection.CreateCommand();
        command.CommandText = "SELECT COUNT(*) FROM sqlite_master WHERE type = 'table' AND name = $name";
        command.Parameters.AddWithValue("$name", table);
        return (long)(await command.ExecuteScalarAsync())! == 1;
    }

    protected override Task DropDatabaseAsync()
    {
        SqliteConnection.ClearAllPools();
        Directory.Delete(folder, recursive: true);
        return Task.CompletedTask;
    }

    private async Task<SqliteConnection> OpenAsync()
    {
        var connection = new SqliteConnection(new SqliteConnectionStringBuilder { DataSource = FilePath, Pooling = false }.ToString());
        await connection.OpenAsync();
        return connection;
    }
}
