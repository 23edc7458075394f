using Microsoft.Data.Sqlite;

namespace Lookahead.Api.Storage;

/// <summary>
/// The default store: one SQLite file in WAL mode with synchronous=FULL, so a commit is on disk before the
/// caller hears about it (a registration survives SIGKILL and power loss alike). Its tables come from
/// <see cref="SqliteMigrations"/>, brought up to date when the store is first used.
/// </summary>
public sealed partial class SqliteModelStore : IModelStore, IDisposable, IAsyncDisposable
{
    private readonly string connectionString;
    private readonly string existingFileConnectionString;
    private readonly MigrationSequence migrations;
    private readonly SemaphoreSlim initialisation = new(1, 1);
    private volatile bool initialised;
    private SqliteStepWriter? stepWriter;
    private SqliteFileAnchor? anchor;

    public SqliteModelStore(string path)
        : this(path, SqliteMigrations.Sequence)
    {
    }

    /// <summary>A store that brings its file to the last version of <paramref name="migrations"/> when first used.</summary>
    internal SqliteModelStore(string path, MigrationSequence migrations)
    {
        this.migrations = migrations;
        FilePath = Path.GetFullPath(path);
        connectionString = new SqliteConnectionStringBuilder
        {
            DataSource = FilePath,
            Mode = SqliteOpenMode.ReadWriteCreate,
            Pooling = true,
            DefaultTimeout = 30,
        }.ToString();

        // After the first open the file must already exist: a deleted file is an error, not a new empty store.
        existingFileConnectionString = new SqliteConnectionStringBuilder(connectionString) { Mode = SqliteOpenMode.ReadWrite }.ToString();
    }

    public string FilePath { get; }

    public async Task<PutOutcome> PutIfAbsentAsync(string tenant, StoredModel model, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var transaction = (SqliteTransaction)await connection.BeginTransactionAsync(cancellationToken);
        await using var command = connection.CreateCommand();
        command.Transaction = transaction;
        command.CommandText = """
            INSERT INTO models (id, name, document, states, inputs, outputs, horizon, registered_at)
            VALUES ($id, $name, $document, $states, $inputs, $outputs, $horizon, $at)
            ON CONFLICT (id) DO NOTHING;
            INSERT INTO model_owners (tenant, model_id, registered_at) VALUES ($tenant, $id, $at)
            ON CONFLICT (tenant, model_id) DO NOTHING;
            SELECT changes();
            """;
        var s = model.Summary;
        command.Parameters.AddWithValue("$tenant", tenant);
        command.Parameters.AddWithValue("$id", s.Id);
        command.Parameters.AddWithValue("$name", (object?)s.Name ?? DBNull.Value);
        command.Parameters.AddWithValue("$document", model.Document);
        command.Parameters.AddWithValue("$states", s.States);
        command.Parameters.AddWithValue("$inputs", s.Inputs);
        command.Parameters.AddWithValue("$outputs", s.Outputs);
        command.Parameters.AddWithValue("$horizon", s.Horizon);
        command.Parameters.AddWithValue("$at", StoreTime.ToStored(s.RegisteredAt));

        // changes() after the second insert: whether this tenant became an owner, whoever held the content before.
        long owned = (long)(await command.ExecuteScalarAsync(cancellationToken))!;
        await transaction.CommitAsync(cancellationToken);
        return owned == 1 ? PutOutcome.Created : PutOutcome.Existing;
    }

    public async Task<StoredModel?> GetAsync(string? tenant, string id, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var command = connection.CreateCommand();
        command.CommandText = tenant is null
            ? "SELECT id, name, states, inputs, outputs, horizon, registered_at, document FROM models WHERE id = $id"
            : """
              SELECT m.id, m.name, m.states, m.inputs, m.outputs, m.horizon, o.registered_at, m.document
              FROM model_owners o JOIN models m ON m.id = o.model_id WHERE o.tenant = $tenant AND o.model_id = $id
              """;
        command.Parameters.AddWithValue("$id", id);
        command.Parameters.AddWithValue("$tenant", (object?)tenant ?? DBNull.Value);
        await using var reader = await command.ExecuteReaderAsync(cancellationToken);
        if (!await reader.ReadAsync(cancellationToken))
        {
            return null;
        }

        return new StoredModel(StoredModelSummary.Read(reader), (byte[])reader.GetValue(7));
    }

    public async Task<ModelListing> ListAsync(string? tenant, int offset, int limit, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var command = connection.CreateCommand();
        command.CommandText = tenant is null
            ? """
              SELECT id, name, states, inputs, outputs, horizon, registered_at FROM models ORDER BY seq LIMIT $limit OFFSET $offset;
              SELECT COUNT(*) FROM models;
              """
            : """
              SELECT m.id, m.name, m.states, m.inputs, m.outputs, m.horizon, o.registered_at
              FROM model_owners o JOIN models m ON m.id = o.model_id WHERE o.tenant = $tenant ORDER BY o.seq LIMIT $limit OFFSET $offset;
              SELECT COUNT(*) FROM model_owners WHERE tenant = $tenant;
              """;
        command.Parameters.AddWithValue("$tenant", (object?)tenant ?? DBNull.Value);
        command.Parameters.AddWithValue("$limit", limit);
        command.Parameters.AddWithValue("$offset", offset);
        await using var reader = await command.ExecuteReaderAsync(cancellationToken);
        var items = new List<StoredModelSummary>();
        while (await reader.ReadAsync(cancellationToken))
        {
            items.Add(StoredModelSummary.Read(reader));
        }

        await reader.NextResultAsync(cancellationToken);
        await reader.ReadAsync(cancellationToken);
        return new ModelListing(items, reader.GetInt64(0));
    }

    public async Task<DeleteOutcome> DeleteAsync(string tenant, string id, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var transaction = (SqliteTransaction)await connection.BeginTransactionAsync(cancellationToken);
        string? alias = await ScalarAsync<string>(
            connection, transaction, "SELECT name FROM aliases WHERE tenant = $tenant AND model_id = $id ORDER BY name LIMIT 1", [("$tenant", tenant), ("$id", id)], cancellationToken);
        if (alias is not null)
        {
            return new DeleteOutcome(DeleteStatus.ReferencedByAlias, alias);
        }

        (string, object)[] owner = [("$tenant", tenant), ("$id", id)];
        int deleted = await ExecuteAsync(connection, transaction, "DELETE FROM model_owners WHERE tenant = $tenant AND model_id = $id", owner, cancellationToken);

        // The content goes with its last owner.
        await ExecuteAsync(
            connection,
            transaction,
            "DELETE FROM models WHERE id = $id AND NOT EXISTS (SELECT 1 FROM model_owners WHERE model_id = $id) AND NOT EXISTS (SELECT 1 FROM aliases WHERE model_id = $id)",
            owner,
            cancellationToken);
        await transaction.CommitAsync(cancellationToken);
        return deleted == 1 ? DeleteOutcome.Deleted : DeleteOutcome.NotFound;
    }

    public async Task<AliasOutcome> SetAliasAsync(string tenant, string name, string modelId, DateTimeOffset at, string? changedBy, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);

        // BEGIN IMMEDIATE: the ownership check and the write see the same database.
        await using (var transaction = (SqliteTransaction)await connection.BeginTransactionAsync(cancellationToken))
        {
            (string, object)[] key = [("$tenant", tenant), ("$name", name)];
            if (await ScalarAsync<string>(connection, transaction, "SELECT model_id FROM model_owners WHERE tenant = $tenant AND model_id = $id", [("$tenant", tenant), ("$id", modelId)], cancellationToken) is null)
            {
                return new AliasOutcome(AliasStatus.ModelNotFound, null);
            }

            string? current = await ScalarAsync<string>(connection, transaction, "SELECT model_id FROM aliases WHERE tenant = $tenant AND name = $name", key, cancellationToken);
            if (current == modelId)
            {
                await transaction.RollbackAsync(cancellationToken);
                return new AliasOutcome(AliasStatus.Unchanged, await ReadAliasAsync(connection, tenant, name, cancellationToken));
            }

            // The caller read the clock before it queued for the write lock, so a change that waited may carry an
            // earlier time than the one before it: clamped, the history read in write order is also in time order.
            long previous = await ScalarAsync<long?>(connection, transaction, "SELECT MAX(set_at) FROM alias_history WHERE tenant = $tenant AND name = $name", key, cancellationToken) ?? long.MinValue;
            await using var command = connection.CreateCommand();
            command.Transaction = transaction;
            command.CommandText = """
                INSERT INTO aliases (tenant, name, model_id, updated_at) VALUES ($tenant, $name, $id, $at)
                ON CONFLICT (tenant, name) DO UPDATE SET model_id = excluded.model_id, updated_at = excluded.updated_at;
                INSERT INTO alias_history (tenant, name, model_id, set_at, changed_by) VALUES ($tenant, $name, $id, $at, $by);
                """;
            command.Parameters.AddWithValue("$tenant", tenant);
            command.Parameters.AddWithValue("$name", name);
            command.Parameters.AddWithValue("$id", modelId);
            command.Parameters.AddWithValue("$at", Math.Max(StoreTime.ToStored(at), previous));
            command.Parameters.AddWithValue("$by", (object?)changedBy ?? DBNull.Value);
            await command.ExecuteNonQueryAsync(cancellationToken);
            await transaction.CommitAsync(cancellationToken);
            var status = current is null ? AliasStatus.Created : AliasStatus.Updated;
            return new AliasOutcome(status, await ReadAliasAsync(connection, tenant, name, cancellationToken));
        }
    }

    public async Task<AliasRecord?> GetAliasAsync(string tenant, string name, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        return await ReadAliasAsync(connection, tenant, name, cancellationToken);
    }

    public async Task<AliasListing> ListAliasesAsync(string tenant, int offset, int limit, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var command = connection.CreateCommand();
        command.CommandText = """
            SELECT name, model_id, updated_at FROM aliases WHERE tenant = $tenant ORDER BY name LIMIT $limit OFFSET $offset;
            SELECT COUNT(*) FROM aliases WHERE tenant = $tenant;
            """;
        command.Parameters.AddWithValue("$tenant", tenant);
        command.Parameters.AddWithValue("$limit", limit);
        command.Parameters.AddWithValue("$offset", offset);
        await using var reader = await command.ExecuteReaderAsync(cancellationToken);
        var items = new List<AliasSummaryRecord>();
        while (await reader.ReadAsync(cancellationToken))
        {
            items.Add(new AliasSummaryRecord(reader.GetString(0), reader.GetString(1), StoreTime.FromStored(reader.GetInt64(2))));
        }

        await reader.NextResultAsync(cancellationToken);
        await reader.ReadAsync(cancellationToken);
        return new AliasListing(items, reader.GetInt64(0));
    }

    public async Task<bool> DeleteAliasAsync(string tenant, string name, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var transaction = (SqliteTransaction)await connection.BeginTransactionAsync(cancellationToken);
        int deleted = await ExecuteAsync(connection, transaction, "DELETE FROM aliases WHERE tenant = $tenant AND name = $name", tenant, name, cancellationToken);
        await ExecuteAsync(connection, transaction, "DELETE FROM alias_history WHERE tenant = $tenant AND name = $name", tenant, name, cancellationToken);
        await transaction.CommitAsync(cancellationToken);
        return deleted == 1;
    }

    private static Task<int> ExecuteAsync(SqliteConnection connection, SqliteTransaction transaction, string sql, string tenant, string name, CancellationToken cancellationToken) =>
        ExecuteAsync(connection, transaction, sql, [("$tenant", tenant), ("$name", name)], cancellationToken);

    private static async Task<int> ExecuteAsync(SqliteConnection connection, SqliteTransaction transaction, string sql, (string Name, object Value)[] parameters, CancellationToken cancellationToken)
    {
        await using var command = connection.CreateCommand();
        command.Transaction = transaction;
        command.CommandText = sql;
        foreach (var (name, value) in parameters)
        {
            command.Parameters.AddWithValue(name, value);
        }

        return await command.ExecuteNonQueryAsync(cancellationToken);
    }

    /// <summary>Station steps go through one writer, started with the first step.</summary>
    private SqliteStepWriter StepWriter => LazyInitializer.EnsureInitialized(ref stepWriter, () => new SqliteStepWriter(OpenAsync, EnsureFileInPlace));

    public void Dispose() => DisposeAsync().AsTask().GetAwaiter().GetResult();

    /// <summary>Lets the steps already queued commit (their callers are waiting), then releases the store.</summary>
    public async ValueTask DisposeAsync()
    {
        if (stepWriter is not null)
        {
            await stepWriter.DisposeAsync();
        }

        anchor?.Dispose();
        initialisation.Dispose();
    }

    /// <summary>
    /// Throws unless the file (or, before it exists, its folder) can be written: the service refuses to start on a
    /// read-only store rather than acknowledge nothing. The probe really writes, so it answers for the user the
    /// service runs as, whatever the permission bits suggest (root ignores them, an immutable file does not).
    /// </summary>
    public void EnsureWritable()
    {
        var folder = Path.GetDirectoryName(FilePath);
        try
        {
            if (File.Exists(FilePath))
            {
                using var file = new FileStream(FilePath, FileMode.Open, FileAccess.ReadWrite, FileShare.ReadWrite | FileShare.Delete);
            }

            if (!string.IsNullOrEmpty(folder) && Directory.Exists(folder))
            {
                // SQLite creates its -wal and -shm files beside the database, so the folder must take new files too.
                var probe = Path.Combine(folder, $".lookahead-write-probe-{Guid.NewGuid():N}");
                using (new FileStream(probe, FileMode.CreateNew, FileAccess.Write, FileShare.None, 1, FileOptions.DeleteOnClose))
                {
                }
            }
        }
        catch (Exception ex) when (ex is UnauthorizedAccessException or IOException)
        {
            throw new InvalidOperationException(
                $"The SQLite store {FilePath} is read-only ({ex.Message}). The service writes registrations, aliases and station state there "
                + "and will not start on a store it cannot write: make the file and its folder writable for the service's user, or set Store:SqlitePath to a writable place.",
                ex);
        }
    }

    public async Task PingAsync(CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await ScalarAsync<long>(connection, null, "SELECT COUNT(*) FROM models", [], cancellationToken);
    }

    private static async Task<AliasRecord?> ReadAliasAsync(SqliteConnection connection, string tenant, string name, CancellationToken cancellationToken)
    {
        await using var command = connection.CreateCommand();
        command.CommandText = """
            SELECT model_id, updated_at FROM aliases WHERE tenant = $tenant AND name = $name;
            SELECT model_id, set_at, changed_by FROM alias_history WHERE tenant = $tenant AND name = $name ORDER BY seq;
            """;
        command.Parameters.AddWithValue("$tenant", tenant);
        command.Parameters.AddWithValue("$name", name);
        await using var reader = await command.ExecuteReaderAsync(cancellationToken);
        if (!await reader.ReadAsync(cancellationToken))
        {
            return null;
        }

        string modelId = reader.GetString(0);
        var updatedAt = StoreTime.FromStored(reader.GetInt64(1));
        await reader.NextResultAsync(cancellationToken);
        var history = new List<AliasChange>();
        while (await reader.ReadAsync(cancellationToken))
        {
            history.Add(new AliasChange(reader.GetString(0), StoreTime.FromStored(reader.GetInt64(1)), reader.IsDBNull(2) ? null : reader.GetString(2)));
        }

        return new AliasRecord(name, modelId, updatedAt, history);
    }

    private static async Task<T?> ScalarAsync<T>(SqliteConnection connection, SqliteTransaction? transaction, string sql, (string Name, object Value)[] parameters, CancellationToken cancellationToken)
    {
        await using var command = connection.CreateCommand();
        command.Transaction = transaction;
        command.CommandText = sql;
        foreach (var (name, value) in parameters)
        {
            command.Parameters.AddWithValue(name, value);
        }

        object? scalar = await command.ExecuteScalarAsync(cancellationToken);
        return scalar is null or DBNull ? default : (T)scalar;
    }

    private async Task<SqliteConnection> OpenAsync(CancellationToken cancellationToken)
    {
        if (!initialised)
        {
            await InitialiseAsync(cancellationToken);
        }

        EnsureFileInPlace();
        var connection = new SqliteConnection(existingFileConnectionString);
        try
        {
            await connection.OpenAsync(cancellationToken);

            // Per connection: FULL fsyncs the WAL on every commit; foreign keys guard alias targets.
            await using var command = connection.CreateCommand();
            command.CommandText = "PRAGMA synchronous = FULL; PRAGMA foreign_keys = ON; PRAGMA busy_timeout = 10000;";
            await command.ExecuteNonQueryAsync(cancellationToken);
            return connection;
        }
        catch
        {
            await connection.DisposeAsync();
            throw;
        }
    }

    /// <summary>Refuses every operation once the file the store opened is no longer at its path (see <see cref="SqliteFileAnchor"/>).</summary>
    private void EnsureFileInPlace()
    {
        if (anchor is { } a && !a.InPlace())
        {
            throw new StoreUnavailableException(
                "The store's database file was deleted or replaced while the service ran; nothing is read or written until the file is restored and the service restarted, so no write is acknowledged and then lost.");
        }
    }

    private async Task InitialiseAsync(CancellationToken cancellationToken)
    {
        await initialisation.WaitAsync(cancellationToken);
        try
        {
            if (initialised)
            {
                return;
            }

            var folder = Path.GetDirectoryName(FilePath);
            if (!string.IsNullOrEmpty(folder))
            {
                Directory.CreateDirectory(folder);
            }

            await using var connection = new SqliteConnection(connectionString);
            await connection.OpenAsync(cancellationToken);

            // The journal mode cannot change inside a transaction, so it is set before the migrations run.
            await using (var command = connection.CreateCommand())
            {
                command.CommandText = "PRAGMA busy_timeout = 10000; PRAGMA journal_mode = WAL; PRAGMA synchronous = FULL;";
                await command.ExecuteNonQueryAsync(cancellationToken);
            }

            await SqliteSchemaMigrator.MigrateAsync(connection, migrations, $"The SQLite store {FilePath}", cancellationToken);
            anchor = SqliteFileAnchor.Take(FilePath);
            initialised = true;
        }
        finally
        {
            initialisation.Release();
        }
    }
}
