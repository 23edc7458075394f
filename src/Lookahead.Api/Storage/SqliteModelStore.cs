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

    public async Task<PutOutcome> PutIfAbsentAsync(StoredModel model, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var command = connection.CreateCommand();
        command.CommandText = """
            INSERT INTO models (id, name, document, states, inputs, outputs, horizon, registered_at)
            VALUES ($id, $name, $document, $states, $inputs, $outputs, $horizon, $at)
            ON CONFLICT (id) DO NOTHING
            """;
        var s = model.Summary;
        command.Parameters.AddWithValue("$id", s.Id);
        command.Parameters.AddWithValue("$name", (object?)s.Name ?? DBNull.Value);
        command.Parameters.AddWithValue("$document", model.Document);
        command.Parameters.AddWithValue("$states", s.States);
        command.Parameters.AddWithValue("$inputs", s.Inputs);
        command.Parameters.AddWithValue("$outputs", s.Outputs);
        command.Parameters.AddWithValue("$horizon", s.Horizon);
        command.Parameters.AddWithValue("$at", StoreTime.ToStored(s.RegisteredAt));
        int inserted = await command.ExecuteNonQueryAsync(cancellationToken);
        return inserted == 1 ? PutOutcome.Created : PutOutcome.Existing;
    }

    public async Task<StoredModel?> GetAsync(string id, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var command = connection.CreateCommand();
        command.CommandText = "SELECT id, name, states, inputs, outputs, horizon, registered_at, document FROM models WHERE id = $id";
        command.Parameters.AddWithValue("$id", id);
        await using var reader = await command.ExecuteReaderAsync(cancellationToken);
        if (!await reader.ReadAsync(cancellationToken))
        {
            return null;
        }

        return new StoredModel(StoredModelSummary.Read(reader), (byte[])reader.GetValue(7));
    }

    public async Task<ModelListing> ListAsync(int offset, int limit, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var command = connection.CreateCommand();
        command.CommandText = """
            SELECT id, name, states, inputs, outputs, horizon, registered_at FROM models ORDER BY seq LIMIT $limit OFFSET $offset;
            SELECT COUNT(*) FROM models;
            """;
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

    public async Task<DeleteOutcome> DeleteAsync(string id, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var transaction = (SqliteTransaction)await connection.BeginTransactionAsync(cancellationToken);
        string? alias = await ScalarAsync<string>(connection, transaction, "SELECT name FROM aliases WHERE model_id = $id ORDER BY name LIMIT 1", ("$id", id), cancellationToken);
        if (alias is not null)
        {
            return new DeleteOutcome(DeleteStatus.ReferencedByAlias, alias);
        }

        await using var command = connection.CreateCommand();
        command.Transaction = transaction;
        command.CommandText = "DELETE FROM models WHERE id = $id";
        command.Parameters.AddWithValue("$id", id);
        int deleted = await command.ExecuteNonQueryAsync(cancellationToken);
        await transaction.CommitAsync(cancellationToken);
        return deleted == 1 ? DeleteOutcome.Deleted : DeleteOutcome.NotFound;
    }

    public async Task<AliasOutcome> SetAliasAsync(string name, string modelId, DateTimeOffset at, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);

        // BEGIN IMMEDIATE: the existence check and the write see the same database.
        await using (var transaction = (SqliteTransaction)await connection.BeginTransactionAsync(cancellationToken))
        {
            if (await ScalarAsync<string>(connection, transaction, "SELECT id FROM models WHERE id = $id", ("$id", modelId), cancellationToken) is null)
            {
                return new AliasOutcome(AliasStatus.ModelNotFound, null);
            }

            string? current = await ScalarAsync<string>(connection, transaction, "SELECT model_id FROM aliases WHERE name = $name", ("$name", name), cancellationToken);
            if (current == modelId)
            {
                await transaction.RollbackAsync(cancellationToken);
                return new AliasOutcome(AliasStatus.Unchanged, await ReadAliasAsync(connection, name, cancellationToken));
            }

            // The caller read the clock before it queued for the write lock, so a change that waited may carry an
            // earlier time than the one before it: clamped, the history read in write order is also in time order.
            long previous = await ScalarAsync<long?>(connection, transaction, "SELECT MAX(set_at) FROM alias_history WHERE name = $name", ("$name", name), cancellationToken) ?? long.MinValue;
            await using var command = connection.CreateCommand();
            command.Transaction = transaction;
            command.CommandText = """
                INSERT INTO aliases (name, model_id, updated_at) VALUES ($name, $id, $at)
                ON CONFLICT (name) DO UPDATE SET model_id = excluded.model_id, updated_at = excluded.updated_at;
                INSERT INTO alias_history (name, model_id, set_at) VALUES ($name, $id, $at);
                """;
            command.Parameters.AddWithValue("$name", name);
            command.Parameters.AddWithValue("$id", modelId);
            command.Parameters.AddWithValue("$at", Math.Max(StoreTime.ToStored(at), previous));
            await command.ExecuteNonQueryAsync(cancellationToken);
            await transaction.CommitAsync(cancellationToken);
            var status = current is null ? AliasStatus.Created : AliasStatus.Updated;
            return new AliasOutcome(status, await ReadAliasAsync(connection, name, cancellationToken));
        }
    }

    public async Task<AliasRecord?> GetAliasAsync(string name, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        return await ReadAliasAsync(connection, name, cancellationToken);
    }

    public async Task<bool> DeleteAliasAsync(string name, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var transaction = (SqliteTransaction)await connection.BeginTransactionAsync(cancellationToken);
        int deleted = await ExecuteAsync(connection, transaction, "DELETE FROM aliases WHERE name = $name", name, cancellationToken);
        await ExecuteAsync(connection, transaction, "DELETE FROM alias_history WHERE name = $name", name, cancellationToken);
        await transaction.CommitAsync(cancellationToken);
        return deleted == 1;
    }

    private static async Task<int> ExecuteAsync(SqliteConnection connection, SqliteTransaction transaction, string sql, string name, CancellationToken cancellationToken)
    {
        await using var command = connection.CreateCommand();
        command.Transaction = transaction;
        command.CommandText = sql;
        command.Parameters.AddWithValue("$name", name);
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
        await ScalarAsync<long>(connection, null, "SELECT COUNT(*) FROM models", null, cancellationToken);
    }

    private static async Task<AliasRecord?> ReadAliasAsync(SqliteConnection connection, string name, CancellationToken cancellationToken)
    {
        await using var command = connection.CreateCommand();
        command.CommandText = """
            SELECT model_id, updated_at FROM aliases WHERE name = $name;
            SELECT model_id, set_at FROM alias_history WHERE name = $name ORDER BY seq;
            """;
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
            history.Add(new AliasChange(reader.GetString(0), StoreTime.FromStored(reader.GetInt64(1))));
        }

        return new AliasRecord(name, modelId, updatedAt, history);
    }

    private static async Task<T?> ScalarAsync<T>(SqliteConnection connection, SqliteTransaction? transaction, string sql, (string Name, object Value)? parameter, CancellationToken cancellationToken)
    {
        await using var command = connection.CreateCommand();
        command.Transaction = transaction;
        command.CommandText = sql;
        if (parameter is { } p)
        {
            command.Parameters.AddWithValue(p.Name, p.Value);
        }

        object? value = await command.ExecuteScalarAsync(cancellationToken);
        return value is null or DBNull ? default : (T)value;
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
