using System.Text;
using Lookahead.Api.Storage;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.Storage;

/// <summary>
/// How every store versions its schema; each implementation runs these against a database of its own that starts
/// out empty, and opens store instances on it as the test needs.
/// </summary>
public abstract class SchemaMigrationContract : IAsyncLifetime
{
    private static readonly DateTimeOffset T0 = new(2025, 1, 6, 7, 30, 0, TimeSpan.Zero);

    private static readonly StoredModel Boiler = new(
        new StoredModelSummary(Id("boiler"), "boiler drum", 2, 1, 1, 12, T0), Encoding.UTF8.GetBytes("""{"states":2,"note":"ü"}"""));

    private static readonly StoredModel Column = new(
        new StoredModelSummary(Id("column"), null, 3, 2, 2, 20, T0.AddHours(1)), Encoding.UTF8.GetBytes("""{"states":3}"""));

    private readonly List<IModelStore> opened = [];

    /// <summary>The migrations the store ships with.</summary>
    private protected abstract MigrationSequence ShippedMigrations { get; }

    /// <summary>A new store instance on this test's database, migrating it with <paramref name="migrations"/> (default: the shipped ones).</summary>
    private protected abstract IModelStore CreateStore(MigrationSequence? migrations);

    /// <summary>Runs statements on this test's database, unqualified names meaning the store's tables.</summary>
    protected abstract Task ExecuteAsync(string sql);

    /// <summary>Creates the tables exactly as stores did before they recorded schema versions.</summary>
    protected abstract Task CreatePreviousSchemaAsync();

    /// <summary>A byte string as a literal of the database's binary type.</summary>
    protected abstract string BinaryLiteral(byte[] bytes);

    /// <summary>(version, name) rows of schema_migrations in version order; empty when the table does not exist.</summary>
    protected abstract Task<IReadOnlyList<(long Version, string Name)>> RecordedVersionsAsync();

    protected abstract Task<bool> TableExistsAsync(string table);

    protected abstract Task DropDatabaseAsync();

    public Task InitializeAsync() => Task.CompletedTask;

    public async Task DisposeAsync()
    {
        foreach (var store in opened)
        {
            switch (store)
            {
                case IAsyncDisposable asyncDisposable:
                    await asyncDisposable.DisposeAsync();
                    break;
                case IDisposable disposable:
                    disposable.Dispose();
                    break;
            }
        }

        await DropDatabaseAsync();
    }

    [StoreFact]
    public async Task A_database_with_the_previous_schema_is_migrated_and_its_data_read_and_written()
    {
        await CreatePreviousSchemaAsync();

        // Rows as the previous schema holds them: times are Unix milliseconds, a missing name is NULL.
        await ExecuteAsync($"""
            INSERT INTO models (id, name, document, states, inputs, outputs, horizon, registered_at) VALUES
                ('{Boiler.Id}', 'boiler drum', {BinaryLiteral(Boiler.Document)}, 2, 1, 1, 12, {T0.ToUnixTimeMilliseconds()}),
                ('{Column.Id}', NULL, {BinaryLiteral(Column.Document)}, 3, 2, 2, 20, {T0.AddHours(1).ToUnixTimeMilliseconds()});
            INSERT INTO aliases (name, model_id, updated_at) VALUES ('unit-4', '{Column.Id}', {T0.AddHours(2).ToUnixTimeMilliseconds()});
            INSERT INTO alias_history (name, model_id, set_at) VALUES
                ('unit-4', '{Boiler.Id}', {T0.AddHours(1).ToUnixTimeMilliseconds()}),
                ('unit-4', '{Column.Id}', {T0.AddHours(2).ToUnixTimeMilliseconds()});
            """);

        var store = Open();

        var boiler = await store.GetAsync("", Boiler.Id, default);
        Assert.NotNull(boiler);
        Assert.Equal(Boiler.Summary, boiler!.Summary);
        Assert.Equal(Boiler.Document, boiler.Document);
        var listing = await store.ListAsync("", 0, 10, default);
        Assert.Equal(2, listing.Total);
        Assert.Equal([Boiler.Summary, Column.Summary], listing.Items);

        var alias = await store.GetAliasAsync("", "unit-4", default);
        Assert.NotNull(alias);
        Assert.Equal(Column.Id, alias!.ModelId);
        Assert.Equal(T0.AddHours(2), alias.UpdatedAt);
        Assert.Equal([new AliasChange(Boiler.Id, T0.AddHours(1), null), new AliasChange(Column.Id, T0.AddHours(2), null)], alias.History);
        var blocked = await store.DeleteAsync("", Column.Id, default);
        Assert.Equal(DeleteStatus.ReferencedByAlias, blocked.Status);
        Assert.Equal("unit-4", blocked.BlockingAlias);

        // New registrations follow the old ones.
        var added = new StoredModel(new StoredModelSummary(Id("added"), "added", 1, 1, 1, 5, T0.AddDays(1)), Encoding.UTF8.GetBytes("{}"));
        Assert.Equal(PutOutcome.Created, await store.PutIfAbsentAsync("", added, default));
        Assert.Equal([Boiler.Id, Column.Id, added.Id], (await store.ListAsync("", 0, 10, default)).Items.Select(i => i.Id));

        Assert.Equal(Expected(ShippedMigrations.Migrations), await RecordedVersionsAsync());
    }

    [StoreFact]
    public async Task A_fresh_database_records_every_version_up_to_the_latest()
    {
        await Open().PingAsync(default);

        var recorded = await RecordedVersionsAsync();

        Assert.Equal(Expected(ShippedMigrations.Migrations), recorded);
        Assert.Equal(ShippedMigrations.Latest, recorded[^1].Version);
    }

    [StoreFact]
    public async Task A_database_at_a_newer_version_is_refused_with_a_clear_message()
    {
        await Open().PingAsync(default);
        long newer = ShippedMigrations.Latest + 1;
        await ExecuteAsync($"INSERT INTO schema_migrations (version, name, applied_at) VALUES ({newer}, 'from a newer build', 0)");

        var store = Open();
        var refused = await Assert.ThrowsAsync<InvalidOperationException>(() => store.PingAsync(default));
        await Assert.ThrowsAsync<InvalidOperationException>(() => store.GetAsync("", Boiler.Id, default));

        Assert.Contains($"is at schema version {newer}", refused.Message);
        Assert.Contains($"knows schema versions up to {ShippedMigrations.Latest}", refused.Message);
        Assert.Contains("refusing to open it", refused.Message);
        Assert.Equal([.. Expected(ShippedMigrations.Migrations), (newer, "from a newer build")], await RecordedVersionsAsync());
    }

    [StoreFact]
    public async Task Pending_migrations_run_in_order_and_each_is_recorded()
    {
        await Open().PingAsync(default);
        int latest = ShippedMigrations.Latest;

        // The second step only works after the first: run out of order, it would fail.
        var extended = new MigrationSequence([
            .. ShippedMigrations.Migrations,
            new(latest + 1, "notes", "CREATE TABLE notes (id integer PRIMARY KEY, body text NOT NULL)"),
            new(latest + 2, "note authors", "ALTER TABLE notes ADD COLUMN author text")]);
        await Open(extended).PingAsync(default);

        Assert.Equal(Expected(extended.Migrations), await RecordedVersionsAsync());
        await ExecuteAsync("INSERT INTO notes (id, body, author) VALUES (1, 'warm start', 'shift B')");
    }

    [StoreFact]
    public async Task A_failing_migration_leaves_the_database_at_the_version_before_it()
    {
        await Open().PingAsync(default);
        var failing = new MigrationSequence([
            .. ShippedMigrations.Migrations,
            new(ShippedMigrations.Latest + 1, "half done", "CREATE TABLE half_done (id integer); INSERT INTO no_such_table VALUES (1)")]);

        await Assert.ThrowsAnyAsync<System.Data.Common.DbException>(() => Open(failing).PingAsync(default));

        Assert.Equal(Expected(ShippedMigrations.Migrations), await RecordedVersionsAsync());
        Assert.False(await TableExistsAsync("half_done"));
        await Open().PingAsync(default);
    }

    [StoreFact]
    public async Task A_same_named_table_of_another_shape_is_not_adopted()
    {
        await ExecuteAsync("CREATE TABLE models (id text PRIMARY KEY, payload text)");

        var refused = await Assert.ThrowsAsync<InvalidOperationException>(() => Open().PingAsync(default));

        Assert.Contains("records no schema version", refused.Message);
        Assert.Contains("'models'", refused.Message);
        Assert.Empty(await RecordedVersionsAsync());
        Assert.False(await TableExistsAsync("aliases"));
    }

    [StoreFact]
    public async Task Stores_opening_one_database_together_migrate_it_once()
    {
        var stores = Enumerable.Range(0, 8).Select(_ => Open()).ToList();

        await Task.WhenAll(stores.Select(s => s.PingAsync(default)));

        Assert.Equal(Expected(ShippedMigrations.Migrations), await RecordedVersionsAsync());
    }

    private static IReadOnlyList<(long Version, string Name)> Expected(IReadOnlyList<SchemaMigration> migrations) =>
        [.. migrations.Select(m => ((long)m.Version, m.Name))];

    private static string Id(string key) => Convert.ToHexStringLower(System.Security.Cryptography.SHA256.HashData(Encoding.UTF8.GetBytes(key)));

    private IModelStore Open(MigrationSequence? migrations = null)
    {
        var store = CreateStore(migrations);
        opened.Add(store);
        return store;
    }
}
