using Npgsql;

namespace Lookahead.Api.Storage;

/// <summary>
/// Brings a PostgreSQL store schema to the latest version. Each migration runs in one transaction together with
/// its row in schema_migrations, under a transaction-scoped advisory lock: replicas starting together take turns,
/// and each finds the version the one before it left.
/// </summary>
internal static class PostgresSchemaMigrator
{
    // Every table of one schema except the version record, each column described the same way for any table.
    private const string ShapesQuery = """
        SELECT c.relname, a.attname || ' ' || format_type(a.atttypid, a.atttypmod) || CASE WHEN a.attnotnull THEN ' NOT NULL' ELSE '' END
        FROM pg_catalog.pg_attribute AS a
            JOIN pg_catalog.pg_class AS c ON c.oid = a.attrelid
            JOIN pg_catalog.pg_namespace AS n ON n.oid = c.relnamespace
        WHERE n.nspname = $1 AND c.relkind IN ('r', 'p') AND c.relname <> 'schema_migrations' AND a.attnum > 0 AND NOT a.attisdropped
        ORDER BY c.relname, a.attnum
        """;

    /// <param name="schema">A lower-case SQL identifier (the store options check it).</param>
    /// <param name="database">Names the schema in messages.</param>
    /// <exception cref="InvalidOperationException">The schema is at a newer version than <paramref name="sequence"/> knows, or holds tables the store did not create.</exception>
    public static async Task MigrateAsync(NpgsqlDataSource dataSource, string schema, MigrationSequence sequence, string database, CancellationToken cancellationToken)
    {
        // Each pass raises the version by at least one (another replica may raise it too), so Latest + 1 passes suffice.
        for (int pass = 0; pass <= sequence.Latest; pass++)
        {
            if (!await ApplyNextAsync(dataSource, schema, sequence, database, cancellationToken))
            {
                return;
            }
        }

        throw new InvalidOperationException($"{database} was still not at schema version {sequence.Latest} after {sequence.Latest + 1} migration passes.");
    }

    /// <summary>Applies the one migration the schema needs next; false when it needs none.</summary>
    private static async Task<bool> ApplyNextAsync(NpgsqlDataSource dataSource, string schema, MigrationSequence sequence, string database, CancellationToken cancellationToken)
    {
        await using var connection = await dataSource.OpenConnectionAsync(cancellationToken);
        await using var transaction = await connection.BeginTransactionAsync(cancellationToken);

        // The key is the one stores took before versions were recorded, so a replica of such a build, creating its
        // tables, and a replica migrating them never run together either.
        await using (var lockSchema = new NpgsqlCommand("SELECT pg_advisory_xact_lock(hashtext($1))", connection, transaction))
        {
            lockSchema.Parameters.Add(new NpgsqlParameter { Value = schema + "/schema" });
            await lockSchema.ExecuteNonQueryAsync(cancellationToken);
        }

        await ExecuteAsync(connection, transaction, $"""
            CREATE SCHEMA IF NOT EXISTS "{schema}";
            CREATE TABLE IF NOT EXISTS "{schema}".schema_migrations (
                version integer PRIMARY KEY,
                name text NOT NULL,
                applied_at bigint NOT NULL);
            SET LOCAL search_path TO "{schema}";
            """, cancellationToken);

        long current;
        await using (var read = new NpgsqlCommand("SELECT COALESCE(MAX(version), 0) FROM schema_migrations", connection, transaction))
        {
            current = Convert.ToInt64(await read.ExecuteScalarAsync(cancellationToken), System.Globalization.CultureInfo.InvariantCulture);
        }

        if (current == 0)
        {
            var present = await ReadShapesAsync(connection, transaction, schema, cancellationToken);
            if (!present.IsEmpty)
            {
                present.EnsureAdoptableAs(await BaselineShapesAsync(connection, transaction, sequence.Baseline, cancellationToken), database);
            }
        }

        var next = sequence.Next(current, database);
        if (next is null)
        {
            await transaction.CommitAsync(cancellationToken);
            return false;
        }

        await ExecuteAsync(connection, transaction, next.Sql, cancellationToken);
        await using (var record = new NpgsqlCommand("INSERT INTO schema_migrations (version, name, applied_at) VALUES ($1, $2, $3)", connection, transaction))
        {
            record.Parameters.Add(new NpgsqlParameter { Value = next.Version });
            record.Parameters.Add(new NpgsqlParameter { Value = next.Name });
            record.Parameters.Add(new NpgsqlParameter { Value = StoreTime.ToStored(DateTimeOffset.UtcNow) });
            await record.ExecuteNonQueryAsync(cancellationToken);
        }

        await transaction.CommitAsync(cancellationToken);
        return true;
    }

    /// <summary>
    /// The tables the first schema creates, read from a scratch schema it is run in inside a savepoint that is then
    /// rolled back, so nothing of it is ever visible outside this transaction.
    /// </summary>
    private static async Task<TableShapes> BaselineShapesAsync(NpgsqlConnection connection, NpgsqlTransaction transaction, SchemaMigration baseline, CancellationToken cancellationToken)
    {
        string probe = "baseline_probe_" + Guid.NewGuid().ToString("N");
        await transaction.SaveAsync("baseline_probe", cancellationToken);
        await ExecuteAsync(connection, transaction, $"""CREATE SCHEMA "{probe}"; SET LOCAL search_path TO "{probe}";""", cancellationToken);
        await ExecuteAsync(connection, transaction, baseline.Sql, cancellationToken);
        var shapes = await ReadShapesAsync(connection, transaction, probe, cancellationToken);

        // Also undoes the SET LOCAL, so the store's schema is the search path again.
        await transaction.RollbackAsync("baseline_probe", cancellationToken);
        return shapes;
    }

    private static async Task<TableShapes> ReadShapesAsync(NpgsqlConnection connection, NpgsqlTransaction transaction, string schema, CancellationToken cancellationToken)
    {
        await using var command = new NpgsqlCommand(ShapesQuery, connection, transaction);
        command.Parameters.Add(new NpgsqlParameter { Value = schema });
        return await TableShapes.ReadAsync(command, cancellationToken);
    }

    private static async Task ExecuteAsync(NpgsqlConnection connection, NpgsqlTransaction transaction, string sql, CancellationToken cancellationToken)
    {
        await using var command = new NpgsqlCommand(sql, connection, transaction);
        await command.ExecuteNonQueryAsync(cancellationToken);
    }
}
