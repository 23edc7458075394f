using Lookahead.Api.Storage;
using Lookahead.Api.Tests.Support;
using Npgsql;

namespace Lookahead.Api.Tests.Storage;

/// <summary>Schema versioning against PostgreSQL, each test in a schema of its own (tests/run.sh starts a server).</summary>
[RequiresEnvironmentVariable("LOOKAHEAD_TEST_POSTGRES", "the PostgreSQL schema migration tests need a server; tests/run.sh starts one and sets this Npgsql connection string")]
public sealed class PostgresSchemaMigrationTests : SchemaMigrationContract
{
    private readonly string schema = "migration_" + Guid.NewGuid().ToString("N")[..12];

    private static string ConnectionString => Environment.GetEnvironmentVariable("LOOKAHEAD_TEST_POSTGRES")!;

    private protected override MigrationSequence ShippedMigrations => PostgresMigrations.Sequence;

    private protected override IModelStore CreateStore(MigrationSequence? migrations) =>
        new PostgresModelStore(ConnectionString, schema, migrations ?? PostgresMigrations.Sequence);

    /// <summary>The tables as stores created them before schema versions were recorded, statement for statement.</summary>
    protected override Task CreatePreviousSchemaAsync() => ExecuteAsync($"""
        CREATE SCHEMA IF NOT EXISTS "{schema}";
        CREATE TABLE IF NOT EXISTS "{schema}".models (
            seq bigserial NOT NULL,
            id text PRIMARY KEY,
            name text,
            document bytea NOT NULL,
            states integer NOT NULL,
            inputs integer NOT NULL,
            outputs integer NOT NULL,
            horizon integer NOT NULL,
            registered_at bigint NOT NULL);
        CREATE UNIQUE INDEX IF NOT EXISTS models_seq ON "{schema}".models (seq);
        CREATE TABLE IF NOT EXISTS "{schema}".aliases (
            name text PRIMARY KEY,
            model_id text NOT NULL REFERENCES "{schema}".models (id),
            updated_at bigint NOT NULL);
        CREATE INDEX IF NOT EXISTS aliases_model ON "{schema}".aliases (model_id);
        CREATE TABLE IF NOT EXISTS "{schema}".alias_history (
            seq bigserial PRIMARY KEY,
            name text NOT NULL,
            model_id text NOT NULL,
            set_at bigint NOT NULL);
        CREATE INDEX IF NOT EXISTS alias_history_name ON "{schema}".alias_history (name, seq);
        """);

    protected override async Task ExecuteAsync(string sql)
    {
        await using var connection = new NpgsqlConnection(ConnectionString);
        await connection.OpenAsync();
        await using var transaction = await connection.BeginTransactionAsync();
        await using (var command = new NpgsqlCommand($"""CREATE SCHEMA IF NOT EXISTS "{schema}"; SET LOCAL search_path TO "{schema}"; {sql}""", connection, transaction))
        {
            await command.ExecuteNonQueryAsync();
        }

        await transaction.CommitAsync();
    }

    protected override string BinaryLiteral(byte[] bytes) => $"decode('{Convert.ToHexString(bytes)}', 'hex')";

    protected override async Task<IReadOnlyList<(long Version, string Name)>> RecordedVersionsAsync()
    {
        if (!await TableExistsAsync("schema_migrations"))
        {
            return [];
        }

        await using var connection = new NpgsqlConnection(ConnectionString);
        await connection.OpenAsync();
        await using var command = new NpgsqlCommand($"""SELECT version, name FROM "{schema}".schema_migrations ORDER BY version""", connection);
        await using var reader = await command.ExecuteReaderAsync();
        var rows = new List<(long, string)>();
        while (await reader.ReadAsync())
        {
            rows.Add((reader.GetInt32(0), reader.GetString(1)));
        }

        return rows;
    }

    protected override async Task<bool> TableExistsAsync(string table)
    {
        await using var connection = new NpgsqlConnection(ConnectionString);
        await connection.OpenAsync();
        await using var command = new NpgsqlCommand("SELECT COUNT(*) FROM pg_catalog.pg_tables WHERE schemaname = $1 AND tablename = $2", connection);
        command.Parameters.Add(new NpgsqlParameter { Value = schema });
        command.Parameters.Add(new NpgsqlParameter { Value = table });
        return (long)(await command.ExecuteScalarAsync())! == 1;
    }

    protected override async Task DropDatabaseAsync()
    {
        await using var connection = new NpgsqlConnection(ConnectionString);
        await connection.OpenAsync();
        await using var drop = new NpgsqlCommand($"DROP SCHEMA IF EXISTS \"{schema}\" CASCADE", connection);
        await drop.ExecuteNonQueryAsync();
    }
}
