using System.Text;
using Lookahead.Api.Storage;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.Storage;

/// <summary>What every <see cref="IModelStore"/> must do; each implementation runs these against a fresh, empty store.</summary>
public abstract class ModelStoreContract : IAsyncLifetime
{
    private static readonly DateTimeOffset T0 = new(2025, 3, 1, 8, 0, 0, TimeSpan.Zero);

    private const string DefaultTenant = "";

    protected IModelStore Store { get; private set; } = null!;

    protected abstract Task<IModelStore> CreateStoreAsync();

    protected abstract Task DropStoreAsync();

    public async Task InitializeAsync() => Store = await CreateStoreAsync();

    public Task DisposeAsync() => DropStoreAsync();

    [StoreFact]
    public async Task Put_if_absent_reports_created_then_existing_and_keeps_the_first_document()
    {
        var model = Model("a", "first");

        Assert.Equal(PutOutcome.Created, await Store.PutIfAbsentAsync(DefaultTenant, model, default));
        Assert.Equal(PutOutcome.Existing, await Store.PutIfAbsentAsync(DefaultTenant, Model("a", "second"), default));

        var stored = await Store.GetAsync(DefaultTenant, Id("a"), default);
        Assert.NotNull(stored);
        Assert.Equal("first", Encoding.UTF8.GetString(stored!.Document));
        Assert.Equal(model.Summary, stored.Summary);
    }

    [StoreFact]
    public async Task Get_of_an_unknown_id_is_null()
    {
        Assert.Null(await Store.GetAsync(DefaultTenant, Id("nothing"), default));
    }

    [StoreFact]
    public async Task List_pages_in_registration_order_with_the_total()
    {
        foreach (var key in new[] { "c", "a", "d", "b" })
        {
            await Store.PutIfAbsentAsync(DefaultTenant, Model(key), default);
        }

        var first = await Store.ListAsync(DefaultTenant, 0, 3, default);
        var rest = await Store.ListAsync(DefaultTenant, 3, 3, default);

        Assert.Equal(4, first.Total);
        Assert.Equal(new[] { "c", "a", "d" }.Select(Id), first.Items.Select(i => i.Id));
        Assert.Equal([Id("b")], rest.Items.Select(i => i.Id));
    }

    [StoreFact]
    public async Task Delete_removes_a_model_and_reports_unknown_ones()
    {
        await Store.PutIfAbsentAsync(DefaultTenant, Model("a"), default);

        Assert.Equal(DeleteStatus.Deleted, (await Store.DeleteAsync(DefaultTenant, Id("a"), default)).Status);
        Assert.Equal(DeleteStatus.NotFound, (await Store.DeleteAsync(DefaultTenant, Id("a"), default)).Status);
        Assert.Null(await Store.GetAsync(DefaultTenant, Id("a"), default));
    }

    [StoreFact]
    public async Task An_alias_keeps_its_history_and_an_unchanged_target_adds_nothing()
    {
        await Store.PutIfAbsentAsync(DefaultTenant, Model("a"), default);
        await Store.PutIfAbsentAsync(DefaultTenant, Model("b"), default);

        Assert.Equal(AliasStatus.Created, (await Store.SetAliasAsync(DefaultTenant, "station", Id("a"), T0, null, default)).Status);
        Assert.Equal(AliasStatus.Updated, (await Store.SetAliasAsync(DefaultTenant, "station", Id("b"), T0.AddMinutes(5), null, default)).Status);
        Assert.Equal(AliasStatus.Unchanged, (await Store.SetAliasAsync(DefaultTenant, "station", Id("b"), T0.AddMinutes(9), null, default)).Status);

        var alias = await Store.GetAliasAsync(DefaultTenant, "station", default);
        Assert.NotNull(alias);
        Assert.Equal(Id("b"), alias!.ModelId);
        Assert.Equal(T0.AddMinutes(5), alias.UpdatedAt);
        Assert.Equal([new AliasChange(Id("a"), T0, null), new AliasChange(Id("b"), T0.AddMinutes(5), null)], alias.History);
    }

    [StoreFact]
    public async Task Concurrent_changes_of_one_alias_leave_its_history_in_time_order()
    {
        const int changes = 100;
        for (int i = 0; i < changes; i++)
        {
            await Store.PutIfAbsentAsync(DefaultTenant, Model("m" + i), default);
        }

        // Each change read its clock before it queued for the lock, so the times arrive in no particular order;
        // shuffled, they cannot come out sorted by chance.
        var requested = Enumerable.Range(0, changes).Select(i => T0.AddSeconds(i)).ToArray();
        new Random(20250301).Shuffle(requested);
        var outcomes = await Task.WhenAll(Enumerable.Range(0, changes).Select(i => Task.Run(() => Store.SetAliasAsync(DefaultTenant, "busy", Id("m" + i), requested[i], null, default))));

        Assert.All(outcomes, o => Assert.NotEqual(AliasStatus.ModelNotFound, o.Status));
        Assert.Single(outcomes, o => o.Status == AliasStatus.Created);
        var alias = await Store.GetAliasAsync(DefaultTenant, "busy", default);
        Assert.NotNull(alias);
        Assert.Equal(changes, alias!.History.Count);
        Assert.Equal(Enumerable.Range(0, changes).Select(i => Id("m" + i)).Order(), alias.History.Select(h => h.ModelId).Order());
        for (int k = 1; k < changes; k++)
        {
            Assert.True(alias.History[k].SetAt >= alias.History[k - 1].SetAt, $"change {k} ({alias.History[k].SetAt:O}) is earlier than change {k - 1} ({alias.History[k - 1].SetAt:O})");
        }

        // A change is never dated before the time it was asked for, and the alias shows its last change.
        var asked = Enumerable.Range(0, changes).ToDictionary(i => Id("m" + i), i => requested[i]);
        Assert.All(alias.History, h => Assert.True(h.SetAt >= asked[h.ModelId]));
        Assert.Equal(alias.History[^1].ModelId, alias.ModelId);
        Assert.Equal(alias.History[^1].SetAt, alias.UpdatedAt);
    }

    [StoreFact]
    public async Task An_alias_cannot_point_at_a_missing_model()
    {
        var outcome = await Store.SetAliasAsync(DefaultTenant, "station", Id("ghost"), T0, null, default);

        Assert.Equal(AliasStatus.ModelNotFound, outcome.Status);
        Assert.Null(await Store.GetAliasAsync(DefaultTenant, "station", default));
    }

    [StoreFact]
    public async Task A_model_an_alias_points_at_is_not_deleted_and_the_alias_is_named()
    {
        await Store.PutIfAbsentAsync(DefaultTenant, Model("a"), default);
        await Store.SetAliasAsync(DefaultTenant, "keeper", Id("a"), T0, null, default);

        var outcome = await Store.DeleteAsync(DefaultTenant, Id("a"), default);

        Assert.Equal(DeleteStatus.ReferencedByAlias, outcome.Status);
        Assert.Equal("keeper", outcome.BlockingAlias);
        Assert.NotNull(await Store.GetAsync(DefaultTenant, Id("a"), default));
        Assert.True(await Store.DeleteAliasAsync(DefaultTenant, "keeper", default));
        Assert.False(await Store.DeleteAliasAsync(DefaultTenant, "keeper", default));
        Assert.Equal(DeleteStatus.Deleted, (await Store.DeleteAsync(DefaultTenant, Id("a"), default)).Status);
    }

    [StoreFact]
    public async Task Ping_succeeds_on_a_reachable_store()
    {
        await Store.PingAsync(default);
    }

    [StoreFact]
    public async Task A_station_is_created_then_replaced_read_listed_by_name_and_deleted()
    {
        var stations = (IStationStore)Store;
        Assert.True(await stations.PutStationAsync(Station("b", 0), default));
        Assert.True(await stations.PutStationAsync(Station("a", 0), default));
        var replaced = Station("b", 0) with { ModelReference = "cold-store", Estimate = """{"state":[1],"disturbance":[]}""" };
        Assert.False(await stations.PutStationAsync(replaced, default));

        Assert.Equal(replaced, await stations.GetStationAsync(DefaultTenant, "b", default));
        var page = await stations.ListStationsAsync(DefaultTenant, 0, 1, default);
        Assert.Equal(2, page.Total);
        Assert.Equal(["a"], page.Items.Select(s => s.Name));
        Assert.Equal(["b"], (await stations.ListStationsAsync(DefaultTenant, 1, 5, default)).Items.Select(s => s.Name));

        Assert.True(await stations.DeleteStationAsync(DefaultTenant, "b", default));
        Assert.False(await stations.DeleteStationAsync(DefaultTenant, "b", default));
        Assert.Null(await stations.GetStationAsync(DefaultTenant, "b", default));
    }

    [StoreFact]
    public async Task A_step_commits_only_on_the_sequence_it_was_computed_from()
    {
        var stations = (IStationStore)Store;
        await stations.PutStationAsync(Station("loop", 0), default);
        var first = Station("loop", 1) with
        {
            StepCount = 1, Estimate = "{}", LastRequestHash = "h1", LastAnswer = """{"sequence":1}""", LastTimestamp = T0.AddTicks(12_345_678), UpdatedAt = T0.AddMinutes(1),
        };

        Assert.True(await stations.CommitStepAsync(Commit(first, 0), default));
        Assert.False(await stations.CommitStepAsync(Commit(first with { Sequence = 2, LastRequestHash = "h2" }, 0), default));
        Assert.Equal(first, await stations.GetStationAsync(DefaultTenant, "loop", default));
        Assert.Equal([0L], (await stations.GetStepsAsync(DefaultTenant, "loop", 10, default)).Select(s => s.Sequence));

        // A station re-bound to another model meanwhile refuses a step computed for the old binding.
        await stations.PutStationAsync(Station("loop", 0) with { ModelId = Id("other") }, default);
        Assert.False(await stations.CommitStepAsync(Commit(first, 0), default));
        Assert.False(await stations.CommitStepAsync(Commit(Station("ghost", 1), 0), default));
        Assert.Empty(await stations.GetStepsAsync(DefaultTenant, "loop", 10, default));
    }

    [StoreFact]
    public async Task A_step_may_move_the_station_to_the_model_its_alias_names_now()
    {
        var stations = (IStationStore)Store;
        await stations.PutStationAsync(Station("follower", 0) with { ModelReference = "tuned" }, default);
        var moved = Station("follower", 1) with { ModelReference = "tuned", ModelId = Id("b"), StepCount = 1 };

        Assert.False(await stations.CommitStepAsync(new StationCommit(moved, 0, Id("b"), null, 10), default));
        Assert.True(await stations.CommitStepAsync(new StationCommit(moved, 0, Id("a"), null, 10), default));
        Assert.Equal(Id("b"), (await stations.GetStationAsync(DefaultTenant, "follower", default))!.ModelId);
    }

    [StoreFact]
    public async Task History_keeps_the_newest_steps_oldest_first_and_goes_with_the_station()
    {
        var stations = (IStationStore)Store;
        await stations.PutStationAsync(Station("kept", 0), default);
        await stations.PutStationAsync(Station("other", 0), default);
        for (long k = 0; k < 7; k++)
        {
            var next = Station("kept", k + 1) with { StepCount = k + 1 };
            Assert.True(await stations.CommitStepAsync(Commit(next, k, historyLength: 3), default));
        }

        await stations.CommitStepAsync(Commit(Station("other", 1), 0), default);

        var steps = await stations.GetStepsAsync(DefaultTenant, "kept", 10, default);
        Assert.Equal([4L, 5L, 6L], steps.Select(s => s.Sequence));
        Assert.Equal($$"""{"step":6}""", steps[^1].Request);
        Assert.Equal([5L, 6L], (await stations.GetStepsAsync(DefaultTenant, "kept", 2, default)).Select(s => s.Sequence));

        Assert.True(await stations.DeleteStationAsync(DefaultTenant, "kept", default));
        Assert.Empty(await stations.GetStepsAsync(DefaultTenant, "kept", 10, default));
        Assert.Single(await stations.GetStepsAsync(DefaultTenant, "other", 10, default));
    }

    [StoreFact]
    public async Task Concurrent_steps_of_many_stations_each_land_once_and_a_failed_guard_spoils_no_other()
    {
        var stations = (IStationStore)Store;
        var names = Enumerable.Range(0, 60).Select(i => $"unit-{i:D3}").ToList();
        foreach (var name in names)
        {
            await stations.PutStationAsync(Station(name, 0), default);
        }

        // Every station gets its right step and a stale one, all at once: only the right ones are written.
        var right = names.Select(n => stations.CommitStepAsync(Commit(Station(n, 1) with { StepCount = 1 }, 0), default)).ToList();
        var stale = names.Select(n => stations.CommitStepAsync(Commit(Station(n, 9) with { StepCount = 9 }, 8), default)).ToList();
        Assert.All(await Task.WhenAll(right), Assert.True);
        Assert.All(await Task.WhenAll(stale), Assert.False);
        foreach (var name in names)
        {
            var stored = await stations.GetStationAsync(DefaultTenant, name, default);
            Assert.Equal(1, stored!.Sequence);
            Assert.Equal([0L], (await stations.GetStepsAsync(DefaultTenant, name, 5, default)).Select(s => s.Sequence));
        }
    }

    [StoreFact]
    public async Task A_tenant_sees_only_what_it_registered_and_registering_held_content_looks_new_to_it()
    {
        Assert.Equal(PutOutcome.Created, await Store.PutIfAbsentAsync("north", Model("a"), default));
        Assert.Null(await Store.GetAsync("south", Id("a"), default));
        Assert.Equal(0, (await Store.ListAsync("south", 0, 10, default)).Total);
        Assert.Equal(DeleteStatus.NotFound, (await Store.DeleteAsync("south", Id("a"), default)).Status);

        // The same answer a tenant gets for content nobody held: nothing tells it another tenant has the model.
        Assert.Equal(PutOutcome.Created, await Store.PutIfAbsentAsync("south", Model("a") with { Summary = Model("a").Summary with { RegisteredAt = T0.AddHours(1) } }, default));
        Assert.Equal(PutOutcome.Existing, await Store.PutIfAbsentAsync("north", Model("a"), default));
        Assert.Equal(T0.AddHours(1), (await Store.GetAsync("south", Id("a"), default))!.Summary.RegisteredAt);
        Assert.Equal(T0, (await Store.GetAsync("north", Id("a"), default))!.Summary.RegisteredAt);

        // Across tenants (admin): every model once.
        await Store.PutIfAbsentAsync("south", Model("b"), default);
        Assert.Equal([Id("a"), Id("b")], (await Store.ListAsync(null, 0, 10, default)).Items.Select(i => i.Id));
        Assert.Equal([Id("a")], (await Store.ListAsync("north", 0, 10, default)).Items.Select(i => i.Id));

        // A delete ends one tenant's ownership; the content goes with the last owner.
        Assert.Equal(DeleteStatus.Deleted, (await Store.DeleteAsync("north", Id("a"), default)).Status);
        Assert.Null(await Store.GetAsync("north", Id("a"), default));
        Assert.NotNull(await Store.GetAsync("south", Id("a"), default));
        Assert.Equal(DeleteStatus.Deleted, (await Store.DeleteAsync("south", Id("a"), default)).Status);
        Assert.Null(await Store.GetAsync(null, Id("a"), default));
    }

    [StoreFact]
    public async Task Alias_listing_pages_one_tenants_aliases_by_name_with_its_total()
    {
        await Store.PutIfAbsentAsync("north", Model("a"), default);
        await Store.PutIfAbsentAsync("north", Model("b"), default);
        await Store.PutIfAbsentAsync("south", Model("c"), default);
        foreach (var name in new[] { "line-2", "dock", "line-10", "aisle" })
        {
            await Store.SetAliasAsync("north", name, Id("a"), T0, null, default);
        }

        await Store.SetAliasAsync("north", "dock", Id("b"), T0.AddMinutes(3), null, default);
        await Store.SetAliasAsync("south", "dock", Id("c"), T0, null, default);
        await Store.SetAliasAsync("south", "zz-south-only", Id("c"), T0, null, default);

        var first = await Store.ListAliasesAsync("north", 0, 3, default);
        var rest = await Store.ListAliasesAsync("north", 3, 3, default);

        Assert.Equal(4, first.Total);
        Assert.Equal(["aisle", "dock", "line-10"], first.Items.Select(a => a.Name));
        Assert.Equal(["line-2"], rest.Items.Select(a => a.Name));
        Assert.Equal(4, rest.Total);
        var dock = first.Items[1];
        Assert.Equal(Id("b"), dock.ModelId);
        Assert.Equal(T0.AddMinutes(3), dock.UpdatedAt);

        var south = await Store.ListAliasesAsync("south", 0, 10, default);
        Assert.Equal(2, south.Total);
        Assert.Equal(["dock", "zz-south-only"], south.Items.Select(a => a.Name));
        Assert.Equal(Id("c"), south.Items[0].ModelId);
        var none = await Store.ListAliasesAsync(DefaultTenant, 0, 10, default);
        Assert.Equal(0, none.Total);
        Assert.Empty(none.Items);
    }

    [StoreFact]
    public async Task Aliases_and_stations_are_named_within_a_tenant_and_an_alias_records_who_changed_it()
    {
        await Store.PutIfAbsentAsync("north", Model("a"), default);
        await Store.PutIfAbsentAsync("south", Model("b"), default);

        Assert.Equal(AliasStatus.Created, (await Store.SetAliasAsync("north", "line", Id("a"), T0, "key-north", default)).Status);
        Assert.Equal(AliasStatus.Created, (await Store.SetAliasAsync("south", "line", Id("b"), T0, "key-south", default)).Status);
        Assert.Equal(AliasStatus.ModelNotFound, (await Store.SetAliasAsync("south", "other", Id("a"), T0, "key-south", default)).Status);
        var north = await Store.GetAliasAsync("north", "line", default);
        Assert.Equal(Id("a"), north!.ModelId);
        Assert.Equal("key-north", Assert.Single(north.History).ChangedBy);
        Assert.Equal(Id("b"), (await Store.GetAliasAsync("south", "line", default))!.ModelId);
        Assert.Null(await Store.GetAliasAsync(DefaultTenant, "line", default));

        // Only the tenant's own alias holds its model.
        Assert.Equal(DeleteStatus.ReferencedByAlias, (await Store.DeleteAsync("north", Id("a"), default)).Status);
        Assert.True(await Store.DeleteAliasAsync("north", "line", default));
        Assert.NotNull(await Store.GetAliasAsync("south", "line", default));

        var stations = (IStationStore)Store;
        Assert.True(await stations.PutStationAsync(Station("unit", 0) with { Tenant = "north" }, default));
        Assert.True(await stations.PutStationAsync(Station("unit", 0) with { Tenant = "south", ModelId = Id("b") }, default));
        Assert.True(await stations.CommitStepAsync(Commit(Station("unit", 1) with { Tenant = "north" }, 0), default));
        Assert.Equal(1, (await stations.GetStationAsync("north", "unit", default))!.Sequence);
        Assert.Equal(0, (await stations.GetStationAsync("south", "unit", default))!.Sequence);
        Assert.Null(await stations.GetStationAsync(DefaultTenant, "unit", default));
        Assert.Single(await stations.GetStepsAsync("north", "unit", 10, default));
        Assert.Empty(await stations.GetStepsAsync("south", "unit", 10, default));
        Assert.Equal(1, (await stations.ListStationsAsync("south", 0, 10, default)).Total);
        Assert.Equal(["north", "south"], (await stations.ListStationsAsync(null, 0, 10, default)).Items.Select(s => s.Tenant));
        Assert.True(await stations.DeleteStationAsync("north", "unit", default));
        Assert.NotNull(await stations.GetStationAsync("south", "unit", default));
    }

    private static StationCommit Commit(StationRecord next, long expected, int historyLength = 10) =>
        new(next, expected, next.ModelId, new StationStepLog(next.Name, expected, T0, $$"""{"step":{{expected}}}""", "{}"), historyLength);

    private static StationRecord Station(string name, long sequence) =>
        new(name, Id("a"), Id("a"), "first-move", sequence, 0, null, null, null, null, null, null, T0);

    protected static string Id(string key) => Convert.ToHexStringLower(System.Security.Cryptography.SHA256.HashData(Encoding.UTF8.GetBytes(key)));

    private static StoredModel Model(string key, string document = "{}") =>
        new(new StoredModelSummary(Id(key), "model " + key, 2, 1, 2, 10, T0), Encoding.UTF8.GetBytes(document));
}
