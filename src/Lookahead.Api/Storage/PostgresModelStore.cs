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

    private string Owners => $"\"{schema}\".model_owners";

    public async Task<PutOutcome> PutIfAbsentAsync(string tenant, StoredModel model, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        var s = model.Summary;

        // One statement: the content if new, then the tenant's ownership; the count says whether the tenant is a new owner.
        await using var command = dataSource.CreateCommand($"""
            WITH content AS (
                INSERT INTO {Models} (id, name, document, states, inputs, outputs, horizon, registered_at)
                VALUES ($1, $2, $3, $4, $5, $6, $7, $8) ON CONFLICT (id) DO NOTHING)
            INSERT INTO {Owners} (tenant, model_id, registered_at) VALUES ($9, $1, $8) ON CONFLICT (tenant, model_id) DO NOTHING
            """);
        command.Parameters.Add(new NpgsqlParameter { Value = s.Id });
        command.Parameters.Add(new NpgsqlParameter { Value = (object?)s.Name ?? DBNull.Value, NpgsqlDbType = NpgsqlDbType.Text });
        command.Parameters.Add(new NpgsqlParameter { Value = model.Document, NpgsqlDbType = NpgsqlDbType.Bytea });
        command.Parameters.Add(new NpgsqlParameter { Value = s.States });
        command.Parameters.Add(new NpgsqlParameter { Value = s.Inputs });
        command.Parameters.Add(new NpgsqlParameter { Value = s.Outputs });
        command.Parameters.Add(new NpgsqlParameter { Value = s.Horizon });
        command.Parameters.Add(new NpgsqlParameter { Value = StoreTime.ToStored(s.RegisteredAt) });
        command.Parameters.Add(new NpgsqlParameter { Value = tenant });

        // The content's last owner may delete it between the two inserts (the ownership's foreign key then fails):
        // the next attempt stores the content again.
        for (int attempt = 1; ; attempt++)
        {
            try
            {
                return await command.ExecuteNonQueryAsync(cancellationToken) == 1 ? PutOutcome.Created : PutOutcome.Existing;
            }
            catch (PostgresException ex) when (ex.SqlState == PostgresErrorCodes.ForeignKeyViolation && attempt < 3)
            {
            }
        }
    }

    public async Task<StoredModel?> GetAsync(string? tenant, string id, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var command = dataSource.CreateCommand(tenant is null
            ? $"SELECT id, name, states, inputs, outputs, horizon, registered_at, document FROM {Models} WHERE id = $1"
            : $"""
               SELECT m.id, m.name, m.states, m.inputs, m.outputs, m.horizon, o.registered_at, m.document
               FROM {Owners} o JOIN {Models} m ON m.id = o.model_id WHERE o.model_id = $1 AND o.tenant = $2
               """);
        command.Parameters.Add(new NpgsqlParameter { Value = id });
        if (tenant is not null)
        {
            command.Parameters.Add(new NpgsqlParameter { Value = tenant });
        }

        await using var reader = await command.ExecuteReaderAsync(cancellationToken);
        if (!await reader.ReadAsync(cancellationToken))
        {
            return null;
        }

        return new StoredModel(StoredModelSummary.Read(reader), reader.GetFieldValue<byte[]>(7));
    }

    public async Task<ModelListing> ListAsync(string? tenant, int offset, int limit, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        var items = new List<StoredModelSummary>();
        await using (var command = dataSource.CreateCommand(tenant is null
            ? $"SELECT id, name, states, inputs, outputs, horizon, registered_at FROM {Models} ORDER BY seq LIMIT $1 OFFSET $2"
            : $"""
               SELECT m.id, m.name, m.states, m.inputs, m.outputs, m.horizon, o.registered_at
               FROM {Owners} o JOIN {Models} m ON m.id = o.model_id WHERE o.tenant = $3 ORDER BY o.seq LIMIT $1 OFFSET $2
               """))
        {
            command.Parameters.Add(new NpgsqlParameter { Value = limit });
            command.Parameters.Add(new NpgsqlParameter { Value = offset });
            if (tenant is not null)
            {
                command.Parameters.Add(new NpgsqlParameter { Value = tenant });
            }

            await using var reader = await command.ExecuteReaderAsync(cancellationToken);
            while (await reader.ReadAsync(cancellationToken))
            {
                items.Add(StoredModelSummary.Read(reader));
            }
        }

        await using var count = dataSource.CreateCommand(tenant is null ? $"SELECT COUNT(*) FROM {Models}" : $"SELECT COUNT(*) FROM {Owners} WHERE tenant = $1");
        if (tenant is not null)
        {
            count.Parameters.Add(new NpgsqlParameter { Value = tenant });
        }

        long total = (long)(await count.ExecuteScalarAsync(cancellationToken))!;
        return new ModelListing(items, total);
    }

    public async Task<DeleteOutcome> DeleteAsync(string tenant, string id, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var connection = await dataSource.OpenConnectionAsync(cancellationToken);
        await using var transaction = await connection.BeginTransactionAsync(cancellationToken);

        // FOR UPDATE on the model row makes a concurrent alias write or registration (which take FOR SHARE on it,
        // or conflict on it) wait for us.
        await using (var lockModel = new NpgsqlCommand($"SELECT id FROM {Models} WHERE id = $1 FOR UPDATE", connection, transaction))
        {
            lockModel.Parameters.Add(new NpgsqlParameter { Value = id });
            if (await lockModel.ExecuteScalarAsync(cancellationToken) is null)
            {
                return DeleteOutcome.NotFound;
            }
        }

        await using (var alias = new NpgsqlCommand($"SELECT name FROM {Aliases} WHERE tenant = $1 AND model_id = $2 ORDER BY name LIMIT 1", connection, transaction))
        {
            alias.Parameters.Add(new NpgsqlParameter { Value = tenant });
            alias.Parameters.Add(new NpgsqlParameter { Value = id });
            if (await alias.ExecuteScalarAsync(cancellationToken) is string name)
            {
                return new DeleteOutcome(DeleteStatus.ReferencedByAlias, name);
            }
        }

        int owned;
        await using (var owner = new NpgsqlCommand($"DELETE FROM {Owners} WHERE tenant = $1 AND model_id = $2", connection, transaction))
        {
            owner.Parameters.Add(new NpgsqlParameter { Value = tenant });
            owner.Parameters.Add(new NpgsqlParameter { Value = id });
            owned = await owner.ExecuteNonQueryAsync(cancellationToken);
        }

        // The content goes with its last owner.
        await using (var delete = new NpgsqlCommand(
            $"DELETE FROM {Models} WHERE id = $1 AND NOT EXISTS (SELECT 1 FROM {Owners} WHERE model_id = $1) AND NOT EXISTS (SELECT 1 FROM {Aliases} WHERE model_id = $1)",
            connection,
            transaction))
        {
            delete.Parameters.Add(new NpgsqlParameter { Value = id });
            await delete.ExecuteNonQueryAsync(cancellationToken);
        }

        await transaction.CommitAsync(cancellationToken);
        return owned == 1 ? DeleteOutcome.Deleted : DeleteOutcome.NotFound;
    }

    public async Task<AliasOutcome> SetAliasAsync(string tenant, string name, string modelId, DateTimeOffset at, string? changedBy, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var connection = await dataSource.OpenConnectionAsync(cancellationToken);
        await using var transaction = await connection.BeginTransactionAsync(cancellationToken);

        // One writer per alias name at a time, so "unchanged" and the history stay consistent.
        await using (var lockName = new NpgsqlCommand("SELECT pg_advisory_xact_lock(hashtext($1))", connection, transaction))
        {
            lockName.Parameters.Add(new NpgsqlParameter { Value = schema + "/alias/" + tenant + "/" + name });
            await lockName.ExecuteNonQueryAsync(cancellationToken);
        }

        await using (var model = new NpgsqlCommand(
            $"SELECT m.id FROM {Models} m JOIN {Owners} o ON o.model_id = m.id AND o.tenant = $2 WHERE m.id = $1 FOR SHARE OF m",
            connection,
            transaction))
        {
            model.Parameters.Add(new NpgsqlParameter { Value = modelId });
            model.Parameters.Add(new NpgsqlParameter { Value = tenant });
            if (await model.ExecuteScalarAsync(cancellationToken) is null)
            {
                return new AliasOutcome(AliasStatus.ModelNotFound, null);
            }
        }

        string? current;
        await using (var read = new NpgsqlCommand($"SELECT model_id FROM {Aliases} WHERE tenant = $1 AND name = $2", connection, transaction))
        {
            read.Parameters.Add(new NpgsqlParameter { Value = tenant });
            read.Parameters.Add(new NpgsqlParameter { Value = name });
            current = await read.ExecuteScalarAsync(cancellationToken) as string;
        }

        if (current == modelId)
        {
            await transaction.RollbackAsync(cancellationToken);
            return new AliasOutcome(AliasStatus.Unchanged, await ReadAliasAsync(connection, tenant, name, cancellationToken));
        }

        // The caller read the clock before it queued for the alias lock (and replicas' clocks differ), so a change
        // that waited may carry an earlier time than the one before it: clamped, the history read in write order is
        // also in time order.
        long stored = StoreTime.ToStored(at);
        await using (var latest = new NpgsqlCommand($"SELECT MAX(set_at) FROM {History} WHERE tenant = $1 AND name = $2", connection, transaction))
        {
            latest.Parameters.Add(new NpgsqlParameter { Value = tenant });
            latest.Parameters.Add(new NpgsqlParameter { Value = name });
            if (await latest.ExecuteScalarAsync(cancellationToken) is long previous)
            {
                stored = Math.Max(stored, previous);
            }
        }

        await using (var write = new NpgsqlCommand(
            $"""
            WITH alias AS (
                INSERT INTO {Aliases} (tenant, name, model_id, updated_at) VALUES ($1, $2, $3, $4)
                ON CONFLICT (tenant, name) DO UPDATE SET model_id = excluded.model_id, updated_at = excluded.updated_at)
            INSERT INTO {History} (tenant, name, model_id, set_at, changed_by) VALUES ($1, $2, $3, $4, $5)
            """,
            connection,
            transaction))
        {
            write.Parameters.Add(new NpgsqlParameter { Value = tenant });
            write.Parameters.Add(new NpgsqlParameter { Value = name });
            write.Parameters.Add(new NpgsqlParameter { Value = modelId });
            write.Parameters.Add(new NpgsqlParameter { Value = stored });
            write.Parameters.Add(new NpgsqlParameter { Value = (object?)changedBy ?? DBNull.Value, NpgsqlDbType = NpgsqlDbType.Text });
            await write.ExecuteNonQueryAsync(cancellationToken);
        }

        await transaction.CommitAsync(cancellationToken);
        var status = current is null ? AliasStatus.Created : AliasStatus.Updated;
        return new AliasOutcome(status, await ReadAliasAsync(connection, tenant, name, cancellationToken));
    }

    public async Task<AliasRecord?> GetAliasAsync(string tenant, string name, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var connection = await dataSource.OpenConnectionAsync(cancellationToken);
        return await ReadAliasAsync(connection, tenant, name, cancellationToken);
    }

    public async Task<AliasListing> ListAliasesAsync(string tenant, int offset, int limit, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        var items = new List<AliasSummaryRecord>();
        // Byte order, like SQLite's default collation, so both stores page alike.
        await using (var command = dataSource.CreateCommand($"SELECT name, model_id, updated_at FROM {Aliases} WHERE tenant = $1 ORDER BY name COLLATE \"C\" LIMIT $2 OFFSET $3"))
        {
            command.Parameters.Add(new NpgsqlParameter { Value = tenant });
            command.Parameters.Add(new NpgsqlParameter { Value = limit });
            command.Parameters.Add(new NpgsqlParameter { Value = offset });
            await using var reader = await command.ExecuteReaderAsync(cancellationToken);
            while (await reader.ReadAsync(cancellationToken))
            {
                items.Add(new AliasSummaryRecord(reader.GetString(0), reader.GetString(1), StoreTime.FromStored(reader.GetInt64(2))));
            }
        }

        await using var count = dataSource.CreateCommand($"SELECT COUNT(*) FROM {Aliases} WHERE tenant = $1");
        count.Parameters.Add(new NpgsqlParameter { Value = tenant });
        return new AliasListing(items, (long)(await count.ExecuteScalarAsync(cancellationToken))!);
    }

    public async Task<bool> DeleteAliasAsync(string tenant, string name, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var connection = await dataSource.OpenConnectionAsync(cancellationToken);
        await using var transaction = await connection.BeginTransactionAsync(cancellationToken);
        int deleted;
        await using (var alias = new NpgsqlCommand($"DELETE FROM {Aliases} WHERE tenant = $1 AND name = $2", connection, transaction))
        {
            alias.Parameters.Add(new NpgsqlParameter { Value = tenant });
            alias.Parameters.Add(new NpgsqlParameter { Value = name });
            deleted = await alias.ExecuteNonQueryAsync(cancellationToken);
        }

        await using (var history = new NpgsqlCommand($"DELETE FROM {History} WHERE tenant = $1 AND name = $2", connection, transaction))
        {
            history.Parameters.Add(new NpgsqlParameter { Value = tenant });
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

    private async Task<AliasRecord?> ReadAliasAsync(NpgsqlConnection connection, string tenant, string name, CancellationToken cancellationToken)
    {
        string modelId;
        DateTimeOffset updatedAt;
        await using (var current = new NpgsqlCommand($"SELECT model_id, updated_at FROM {Aliases} WHERE tenant = $1 AND name = $2", connection))
        {
            current.Parameters.Add(new NpgsqlParameter { Value = tenant });
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
        await using (var changes = new NpgsqlCommand($"SELECT model_id, set_at, changed_by FROM {History} WHERE tenant = $1 AND name = $2 ORDER BY seq", connection))
        {
            changes.Parameters.Add(new NpgsqlParameter { Value = tenant });
            changes.Parameters.Add(new NpgsqlParameter { Value = name });
            await using var reader = await changes.ExecuteReaderAsync(cancellationToken);
            while (await reader.ReadAsync(cancellationToken))
            {
                history.Add(new AliasChange(reader.GetString(0), StoreTime.FromStored(reader.GetInt64(1)), reader.IsDBNull(2) ? null : reader.GetString(2)));
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
