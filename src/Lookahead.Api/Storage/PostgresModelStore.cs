using Npgsql;
using NpgsqlTypes;

namespace Lookahead.Api.Storage;

/// <summary>
/// The shared store for several service instances. Documents are kept as bytea, not jsonb, because jsonb
/// reorders keys and the stored bytes must be exactly the canonical form the id hashes. Its tables come from
/// <see cref="PostgresMigrations"/>, brought up to date when the store is first used.
/// </summary>
public sealed partial class PostgresModelStore : IModelStore, IAsyncDisposable
{
    private readonly NpgsqlDataSource dataSource;
    private readonly string schema;
    private readonly MigrationSequence migrations;
    private readonly SemaphoreSlim initialisation = new(1, 1);
    private volatile bool initialised;

    public PostgresModelStore(string connectionString, string schema)
        : this(connectionString, schema, PostgresMigrations.Sequence)
    {
    }

    /// <summary>A store that brings its schema to the last version of <paramref name="migrations"/> when first used.</summary>
    internal PostgresModelStore(string connectionString, string schema, MigrationSequence migrations)
    {
        dataSource = NpgsqlDataSource.Create(connectionString);
        this.schema = schema;
        this.migrations = migrations;
    }

    private string Models => $"\"{schema}\".models";

    private string Aliases => $"\"{schema}\".aliases";

    private string History => $"\"{schema}\".alias_history";

    public async Task<PutOutcome> PutIfAbsentAsync(StoredModel model, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        var s = model.Summary;
        await using var command = dataSource.CreateCommand($"""
            INSERT INTO {Models} (id, name, document, states, inputs, outputs, horizon, registered_at)
            VALUES ($1, $2, $3, $4, $5, $6, $7, $8) ON CONFLICT (id) DO NOTHING
            """);
        command.Parameters.Add(new NpgsqlParameter { Value = s.Id });
        command.Parameters.Add(new NpgsqlParameter { Value = (object?)s.Name ?? DBNull.Value, NpgsqlDbType = NpgsqlDbType.Text });
        command.Parameters.Add(new NpgsqlParameter { Value = model.Document, NpgsqlDbType = NpgsqlDbType.Bytea });
        command.Parameters.Add(new NpgsqlParameter { Value = s.States });
        command.Parameters.Add(new NpgsqlParameter { Value = s.Inputs });
        command.Parameters.Add(new NpgsqlParameter { Value = s.Outputs });
        command.Parameters.Add(new NpgsqlParameter { Value = s.Horizon });
        command.Parameters.Add(new NpgsqlParameter { Value = StoreTime.ToStored(s.RegisteredAt) });
        return await command.ExecuteNonQueryAsync(cancellationToken) == 1 ? PutOutcome.Created : PutOutcome.Existing;
    }

    public async Task<StoredModel?> GetAsync(string id, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var command = dataSource.CreateCommand($"SELECT id, name, states, inputs, outputs, horizon, registered_at, document FROM {Models} WHERE id = $1");
        command.Parameters.Add(new NpgsqlParameter { Value = id });
        await using var reader = await command.ExecuteReaderAsync(cancellationToken);
        if (!await reader.ReadAsync(cancellationToken))
        {
            return null;
        }

        return new StoredModel(StoredModelSummary.Read(reader), reader.GetFieldValue<byte[]>(7));
    }

    public async Task<ModelListing> ListAsync(int offset, int limit, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        var items = new List<StoredModelSummary>();
        await using (var command = dataSource.CreateCommand($"SELECT id, name, states, inputs, outputs, horizon, registered_at FROM {Models} ORDER BY seq LIMIT $1 OFFSET $2"))
        {
            command.Parameters.Add(new NpgsqlParameter { Value = limit });
            command.Parameters.Add(new NpgsqlParameter { Value = offset });
            await using var reader = await command.ExecuteReaderAsync(cancellationToken);
            while (await reader.ReadAsync(cancellationToken))
            {
                items.Add(StoredModelSummary.Read(reader));
            }
        }

        await using var count = dataSource.CreateCommand($"SELECT COUNT(*) FROM {Models}");
        long total = (long)(await count.ExecuteScalarAsync(cancellationToken))!;
        return new ModelListing(items, total);
    }

    public async Task<DeleteOutcome> DeleteAsync(string id, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var connection = await dataSource.OpenConnectionAsync(cancellationToken);
        await using var transaction = await connection.BeginTransactionAsync(cancellationToken);

        // FOR UPDATE on the model row makes a concurrent alias write (which takes FOR SHARE on it) wait for us.
        await using (var lockModel = new NpgsqlCommand($"SELECT id FROM {Models} WHERE id = $1 FOR UPDATE", connection, transaction))
        {
            lockModel.Parameters.Add(new NpgsqlParameter { Value = id });
            if (await lockModel.ExecuteScalarAsync(cancellationToken) is null)
            {
                return DeleteOutcome.NotFound;
            }
        }

        await using (var alias = new NpgsqlCommand($"SELECT name FROM {Aliases} WHERE model_id = $1 ORDER BY name LIMIT 1", connection, transaction))
        {
            alias.Parameters.Add(new NpgsqlParameter { Value = id });
            if (await alias.ExecuteScalarAsync(cancellationToken) is string name)
            {
                return new DeleteOutcome(DeleteStatus.ReferencedByAlias, name);
            }
        }

        await using (var delete = new NpgsqlCommand($"DELETE FROM {Models} WHERE id = $1", connection, transaction))
        {
            delete.Parameters.Add(new NpgsqlParameter { Value = id });
            await delete.ExecuteNonQueryAsync(cancellationToken);
        }

        await transaction.CommitAsync(cancellationToken);
        return DeleteOutcome.Deleted;
    }

    public async Task<AliasOutcome> SetAliasAsync(string name, string modelId, DateTimeOffset at, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var connection = await dataSource.OpenConnectionAsync(cancellationToken);
        await using var transaction = await connection.BeginTransactionAsync(cancellationToken);

        // One writer per alias name at a time, so "unchanged" and the history stay consistent.
        await using (var lockName = new NpgsqlCommand("SELECT pg_advisory_xact_lock(hashtext($1))", connection, transaction))
        {
            lockName.Parameters.Add(new NpgsqlParameter { Value = schema + "/alias/" + name });
            await lockName.ExecuteNonQueryAsync(cancellationToken);
        }

        await using (var model = new NpgsqlCommand($"SELECT id FROM {Models} WHERE id = $1 FOR SHARE", connection, transaction))
        {
            model.Parameters.Add(new NpgsqlParameter { Value = modelId });
            if (await model.ExecuteScalarAsync(cancellationToken) is null)
            {
                return new AliasOutcome(AliasStatus.ModelNotFound, null);
            }
        }

        string? current;
        await using (var read = new NpgsqlCommand($"SELECT model_id FROM {Aliases} WHERE name = $1", connection, transaction))
        {
            read.Parameters.Add(new NpgsqlParameter { Value = name });
            current = await read.ExecuteScalarAsync(cancellationToken) as string;
        }

        if (current == modelId)
        {
            await transaction.RollbackAsync(cancellationToken);
            return new AliasOutcome(AliasStatus.Unchanged, await ReadAliasAsync(connection, name, cancellationToken));
        }

        // The caller read the clock before it queued for the alias lock (and replicas' clocks differ), so a change
        // that waited may carry an earlier time than the one before it: clamped, the history read in write order is
        // also in time order.
        long stored = StoreTime.ToStored(at);
        await using (var latest = new NpgsqlCommand($"SELECT MAX(set_at) FROM {History} WHERE name = $1", connection, transaction))
        {
            latest.Parameters.Add(new NpgsqlParameter { Value = name });
            if (await latest.ExecuteScalarAsync(cancellationToken) is long previous)
            {
                stored = Math.Max(stored, previous);
            }
        }

        await using (var write = new NpgsqlCommand(
            $"""
            INSERT INTO {Aliases} (name, model_id, updated_at) VALUES ($1, $2, $3)
            ON CONFLICT (name) DO UPDATE SET model_id = excluded.model_id, updated_at = excluded.updated_at
            """,
            connection,
            transaction))
        {
            write.Parameters.Add(new NpgsqlParameter { Value = name });
            write.Parameters.Add(new NpgsqlParameter { Value = modelId });
            write.Parameters.Add(new NpgsqlParameter { Value = stored });
            await write.ExecuteNonQueryAsync(cancellationToken);
        }

        await using (var history = new NpgsqlCommand($"INSERT INTO {History} (name, model_id, set_at) VALUES ($1, $2, $3)", connection, transaction))
        {
            history.Parameters.Add(new NpgsqlParameter { Value = name });
            history.Parameters.Add(new NpgsqlParameter { Value = modelId });
            history.Parameters.Add(new NpgsqlParameter { Value = stored });
            await history.ExecuteNonQueryAsync(cancellationToken);
        }

        await transaction.CommitAsync(cancellationToken);
        var status = current is null ? AliasStatus.Created : AliasStatus.Updated;
        return new AliasOutcome(status, await ReadAliasAsync(connection, name, cancellationToken));
    }

    public async Task<AliasRecord?> GetAliasAsync(string name, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var connection = await dataSource.OpenConnectionAsync(cancellationToken);
        return await ReadAliasAsync(connection, name, cancellationToken);
    }

    public async Task<bool> DeleteAliasAsync(string name, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var connection = await dataSource.OpenConnectionAsync(cancellationToken);
        await using var transaction = await connection.BeginTransactionAsync(cancellationToken);
        int deleted;
        await using (var alias = new NpgsqlCommand($"DELETE FROM {Aliases} WHERE name = $1", connection, transaction))
        {
            alias.Parameters.Add(new NpgsqlParameter { Value = name });
            deleted = await alias.ExecuteNonQueryAsync(cancellationToken);
        }

        await using (var history = new NpgsqlCommand($"DELETE FROM {History} WHERE name = $1", connection, transaction))
        {
            history.Parameters.Add(new NpgsqlParameter { Value = name });
            await history.ExecuteNonQueryAsync(cancellationToken);
        }

        await transaction.CommitAsync(cancellationToken);
        return deleted == 1;
    }

    public async Task PingAsync(CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var command = dataSource.CreateCommand($"SELECT COUNT(*) FROM {Models}");
        await command.ExecuteScalarAsync(cancellationToken);
    }

    /// <summary>Closes the idle pooled connections, so none that died with a server restart is handed out again.</summary>
    public void ClearPool() => dataSource.Clear();

    public async ValueTask DisposeAsync()
    {
        initialisation.Dispose();
        await dataSource.DisposeAsync();
    }

    private async Task<AliasRecord?> ReadAliasAsync(NpgsqlConnection connection, string name, CancellationToken cancellationToken)
    {
        string modelId;
        DateTimeOffset updatedAt;
        await using (var current = new NpgsqlCommand($"SELECT model_id, updated_at FROM {Aliases} WHERE name = $1", connection))
        {
            current.Parameters.Add(new NpgsqlParameter { Value = name });
            await using var reader = await current.ExecuteReaderAsync(cancellationToken);
            if (!await reader.ReadAsync(cancellationToken))
            {
                return null;
            }

            modelId = reader.GetString(0);
            updatedAt = StoreTime.FromStored(reader.GetInt64(1));
        }

        var history = new List<AliasChange>();
        await using (var changes = new NpgsqlCommand($"SELECT model_id, set_at FROM {History} WHERE name = $1 ORDER BY seq", connection))
        {
            changes.Parameters.Add(new NpgsqlParameter { Value = name });
            await using var reader = await changes.ExecuteReaderAsync(cancellationToken);
            while (await reader.ReadAsync(cancellationToken))
            {
                history.Add(new AliasChange(reader.GetString(0), StoreTime.FromStored(reader.GetInt64(1))));
            }
        }

        return new AliasRecord(name, modelId, updatedAt, history);
    }

    private async Task EnsureSchemaAsync(CancellationToken cancellationToken)
    {
        if (initialised)
        {
            return;
        }

        await initialisation.WaitAsync(cancellationToken);
        try
        {
            if (initialised)
            {
                return;
            }

            await PostgresSchemaMigrator.MigrateAsync(dataSource, schema, migrations, $"The PostgreSQL store schema \"{schema}\"", cancellationToken);
            initialised = true;
        }
        finally
        {
            initialisation.Release();
        }
    }
}
