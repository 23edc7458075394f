using Microsoft.Data.Sqlite;

namespace Lookahead.Api.Storage;

/// <summary>
/// Brings a SQLite store file to the latest schema version. Each migration runs in one BEGIN IMMEDIATE transaction
/// together with its row in schema_migrations: the write lock makes a second process opening the same file wait and
/// then find the new version, and a crash leaves the file at the previous version, never half-way.
/// </summary>
internal static class SqliteSchemaMigrator
{
    private const string VersionTable = """
        CREATE TABLE IF NOT EXISTS schema_migrations (
            version INTEGER PRIMARY KEY,
            name TEXT NOT NULL,
            applied_at INTEGER NOT NULL);
        """;

    // Every table except SQLite's own and the version record, each column described the same way for any table.
    private const string ShapesQuery = """
        SELECT m.name, p.name || ' ' || p.type
            || CASE WHEN p."notnull" THEN ' NOT NULL' ELSE '' END
            || CASE WHEN p.pk > 0 THEN ' PRIMARY KEY' ELSE '' END
        FROM sqlite_master AS m JOIN pragma_table_info(m.name) AS p
        WHERE m.type = 'table' AND m.name NOT LIKE 'sqlite\_%' ESCAPE '\' AND m.name <> 'schema_migrations'
        ORDER BY m.name, p.cid
        """;

    /// <param name="database">Names the file in messages.</param>
    /// <exception cref="InvalidOperationException">The file is at a newer version than <paramref name="sequence"/> knows, or holds tables the store did not create.</exception>
    public static async Task MigrateAsync(SqliteConnection connection, MigrationSequence sequence, string database, CancellationToken cancellationToken)
    {
        // Each pass raises the version by at least one (another process may raise it too), so Latest + 1 passes suffice.
        for (int pass = 0; pass <= sequence.Latest; pass++)
        {
            if (!await ApplyNextAsync(connection, sequence, database, cancellationToken))
            {
                return;
            }
        }

        throw new InvalidOperationException($"{database} was still not at schema version {sequence.Latest} after {sequence.Latest + 1} migration passes.");
    }

    /// <summary>Applies the one migration the file needs next; false when it needs none.</summary>
    private static async Task<bool> ApplyNextAsync(SqliteConnection connection, MigrationSequence sequence, string database, CancellationToken cancellationToken)
    {
        // Microsoft.Data.Sqlite begins IMMEDIATE by default: the write lock is held before the version is read.
        await using var transaction = (SqliteTransaction)await connection.BeginTransactionAsync(cancellationToken);
        await ExecuteAsync(connection, transaction, VersionTable, cancellationToken);
        long current;
        await using (var read = connection.CreateCommand())
        {
            read.Transaction = transaction;
            read.CommandText = "SELECT COALESCE(MAX(version), 0) FROM schema_migrations";
            current = (long)(await read.ExecuteScalarAsync(cancellationToken))!;
        }

        if (current == 0)
        {
            var present = await ReadShapesAsync(connection, transaction, cancellationToken);
            if (!present.IsEmpty)
            {
                present.EnsureAdoptableAs(await BaselineShapesAsync(sequence.Baseline, cancellationToken), database);
            }
        }

        var next = sequence.Next(current, database);
        if (next is null)
        {
            await transaction.CommitAsync(cancellationToken);
            return false;
        }

        await ExecuteAsync(connection, transaction, next.Sql, cancellationToken);
        await using (var record = connection.CreateCommand())
        {
            record.Transaction = transaction;
            record.CommandText = "INSERT INTO schema_migrations (version, name, applied_at) VALUES ($version, $name, $at)";
            record.Parameters.AddWithValue("$version", next.Version);
            record.Parameters.AddWithValue("$name", next.Name);
            record.Parameters.AddWithValue("$at", StoreTime.ToStored(DateTimeOffset.UtcNow));
            await record.ExecuteNonQueryAsync(cancellationToken);
        }

        await transaction.CommitAsync(cancellationToken);
        return true;
    }

    /// <summary>The tables the first schema creates, read from a private in-memory database it has just been run in.</summary>
    private static async Task<TableShapes> BaselineShapesAsync(SchemaMigration baseline, CancellationToken cancellationToken)
    {
        await using var probe = new SqliteConnection("Data Source=:memory:");
        await probe.OpenAsync(cancellationToken);
        await ExecuteAsync(probe, null, baseline.Sql, cancellationToken);
        return await ReadShapesAsync(probe, null, cancellationToken);
    }

    private static async Task<TableShapes> ReadShapesAsync(SqliteConnection connection, SqliteTransaction? transaction, CancellationToken cancellationToken)
    {
        await using var command = connection.CreateCommand();
        command.Transaction = transaction;
        command.CommandText = ShapesQuery;
        return await TableShapes.ReadAsync(command, cancellationToken);
    }

    private static async Task ExecuteAsync(SqliteConnection connection, SqliteTransaction? transaction, string sql, CancellationToken cancellationToken)
    {
        await using var command = connection.CreateCommand();
        command.Transaction = transaction;
        command.CommandText = sql;
        await command.ExecuteNonQueryAsync(cancellationToken);
    }
}
