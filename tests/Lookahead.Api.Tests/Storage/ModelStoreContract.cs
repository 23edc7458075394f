using System.Text;
using Lookahead.Api.Storage;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.Storage;

/// <summary>What every <see cref="IModelStore"/> must do; each implementation runs these against a fresh, empty store.</summary>
public abstract class ModelStoreContract : IAsyncLifetime
{
    private static readonly DateTimeOffset T0 = new(2025, 3, 1, 8, 0, 0, TimeSpan.Zero);

    protected IModelStore Store { get; private set; } = null!;

    protected abstract Task<IModelStore> CreateStoreAsync();

    protected abstract Task DropStoreAsync();

    public async Task InitializeAsync() => Store = await CreateStoreAsync();

    public Task DisposeAsync() => DropStoreAsync();

    [StoreFact]
    public async Task Put_if_absent_reports_created_then_existing_and_keeps_the_first_document()
    {
        var model = Model("a", "first");

        Assert.Equal(PutOutcome.Created, await Store.PutIfAbsentAsync(model, default));
        Assert.Equal(PutOutcome.Existing, await Store.PutIfAbsentAsync(Model("a", "second"), default));

        var stored = await Store.GetAsync(Id("a"), default);
        Assert.NotNull(stored);
        Assert.Equal("first", Encoding.UTF8.GetString(stored!.Document));
        Assert.Equal(model.Summary, stored.Summary);
    }

    [StoreFact]
    public async Task Get_of_an_unknown_id_is_null()
    {
        Assert.Null(await Store.GetAsync(Id("nothing"), default));
    }

    [StoreFact]
    public async Task List_pages_in_registration_order_with_the_total()
    {
        foreach (var key in new[] { "c", "a", "d", "b" })
        {
            await Store.PutIfAbsentAsync(Model(key), default);
        }

        var first = await Store.ListAsync(0, 3, default);
        var rest = await Store.ListAsync(3, 3, default);

        Assert.Equal(4, first.Total);
        Assert.Equal(new[] { "c", "a", "d" }.Select(Id), first.Items.Select(i => i.Id));
        Assert.Equal([Id("b")], rest.Items.Select(i => i.Id));
    }

    [StoreFact]
    public async Task Delete_removes_a_model_and_reports_unknown_ones()
    {
        await Store.PutIfAbsentAsync(Model("a"), default);

        Assert.Equal(DeleteStatus.Deleted, (await Store.DeleteAsync(Id("a"), default)).Status);
        Assert.Equal(DeleteStatus.NotFound, (await Store.DeleteAsync(Id("a"), default)).Status);
        Assert.Null(await Store.GetAsync(Id("a"), default));
    }

    [StoreFact]
    public async Task An_alias_keeps_its_history_and_an_unchanged_target_adds_nothing()
    {
        await Store.PutIfAbsentAsync(Model("a"), default);
        await Store.PutIfAbsentAsync(Model("b"), default);

        Assert.Equal(AliasStatus.Created, (await Store.SetAliasAsync("station", Id("a"), T0, default)).Status);
        Assert.Equal(AliasStatus.Updated, (await Store.SetAliasAsync("station", Id("b"), T0.AddMinutes(5), default)).Status);
        Assert.Equal(AliasStatus.Unchanged, (await Store.SetAliasAsync("station", Id("b"), T0.AddMinutes(9), default)).Status);

        var alias = await Store.GetAliasAsync("station", default);
        Assert.NotNull(alias);
        Assert.Equal(Id("b"), alias!.ModelId);
        Assert.Equal(T0.AddMinutes(5), alias.UpdatedAt);
        Assert.Equal([new AliasChange(Id("a"), T0), new AliasChange(Id("b"), T0.AddMinutes(5))], alias.History);
    }

    [StoreFact]
    public async Task Concurrent_changes_of_one_alias_leave_its_history_in_time_order()
    {
        const int changes = 100;
        for (int i = 0; i < changes; i++)
        {
            await Store.PutIfAbsentAsync(Model("m" + i), default);
        }

        // Each change read its clock before it queued for the lock, so the times arrive in no particular order;
        // shuffled, they cannot come out sorted by chance.
        var requested = Enumerable.Range(0, changes).Select(i => T0.AddSeconds(i)).ToArray();
        new Random(20250301).Shuffle(requested);
        var outcomes = await Task.WhenAll(Enumerable.Range(0, changes).Select(i => Task.Run(() => Store.SetAliasAsync("busy", Id("m" + i), requested[i], default))));

        Assert.All(outcomes, o => Assert.NotEqual(AliasStatus.ModelNotFound, o.Status));
        Assert.Single(outcomes, o => o.Status == AliasStatus.Created);
        var alias = await Store.GetAliasAsync("busy", default);
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
        var outcome = await Store.SetAliasAsync("station", Id("ghost"), T0, default);

        Assert.Equal(AliasStatus.ModelNotFound, outcome.Status);
        Assert.Null(await Store.GetAliasAsync("station", default));
    }

    [StoreFact]
    public async Task A_model_an_alias_points_at_is_not_deleted_and_the_alias_is_named()
    {
        await Store.PutIfAbsentAsync(Model("a"), default);
        await Store.SetAliasAsync("keeper", Id("a"), T0, default);

        var outcome = await Store.DeleteAsync(Id("a"), default);

        Assert.Equal(DeleteStatus.ReferencedByAlias, outcome.Status);
        Assert.Equal("keeper", outcome.BlockingAlias);
        Assert.NotNull(await Store.GetAsync(Id("a"), default));
        Assert.True(await Store.DeleteAliasAsync("keeper", default));
        Assert.False(await Store.DeleteAliasAsync("keeper", default));
        Assert.Equal(DeleteStatus.Deleted, (await Store.DeleteAsync(Id("a"), default)).Status);
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

        Assert.Equal(replaced, await stations.GetStationAsync("b", default));
        var page = await stations.ListStationsAsync(0, 1, default);
        Assert.Equal(2, page.Total);
        Assert.Equal(["a"], page.Items.Select(s => s.Name));
        Assert.Equal(["b"], (await stations.ListStationsAsync(1, 5, default)).Items.Select(s => s.Name));

        Assert.True(await stations.DeleteStationAsync("b", default));
        Assert.False(await stations.DeleteStationAsync("b", default));
        Assert.Null(await stations.GetStationAsync("b", default));
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
        Assert.Equal(first, await stations.GetStationAsync("loop", default));
        Assert.Equal([0L], (await stations.GetStepsAsync("loop", 10, default)).Select(s => s.Sequence));

        // A station re-bound to another model meanwhile refuses a step computed for the old binding.
        await stations.PutStationAsync(Station("loop", 0) with { ModelId = Id("other") }, default);
        Assert.False(await stations.CommitStepAsync(Commit(first, 0), default));
        Assert.False(await stations.CommitStepAsync(Commit(Station("ghost", 1), 0), default));
        Assert.Empty(await stations.GetStepsAsync("loop", 10, default));
    }

    [StoreFact]
    public async Task A_step_may_move_the_station_to_the_model_its_alias_names_now()
    {
        var stations = (IStationStore)Store;
        await stations.PutStationAsync(Station("follower", 0) with { ModelReference = "tuned" }, default);
        var moved = Station("follower", 1) with { ModelReference = "tuned", ModelId = Id("b"), StepCount = 1 };

        Assert.False(await stations.CommitStepAsync(new StationCommit(moved, 0, Id("b"), null, 10), default));
        Assert.True(await stations.CommitStepAsync(new StationCommit(moved, 0, Id("a"), null, 10), default));
        Assert.Equal(Id("b"), (await stations.GetStationAsync("follower", default))!.ModelId);
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

        var steps = await stations.GetStepsAsync("kept", 10, default);
        Assert.Equal([4L, 5L, 6L], steps.Select(s => s.Sequence));
        Assert.Equal($$"""{"step":6}""", steps[^1].Request);
        Assert.Equal([5L, 6L], (await stations.GetStepsAsync("kept", 2, default)).Select(s => s.Sequence));

        Assert.True(await stations.DeleteStationAsync("kept", default));
        Assert.Empty(await stations.GetStepsAsync("kept", 10, default));
        Assert.Single(await stations.GetStepsAsync("other", 10, default));
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
            var stored = await stations.GetStationAsync(name, default);
            Assert.Equal(1, stored!.Sequence);
            Assert.Equal([0L], (await stations.GetStepsAsync(name, 5, default)).Select(s => s.Sequence));
        }
    }

    private static StationCommit Commit(StationRecord next, long expected, int historyLength = 10) =>
        new(next, expected, next.ModelId, new StationStepLog(next.Name, expected, T0, $$"""{"step":{{expected}}}""", "{}"), historyLength);

    private static StationRecord Station(string name, long sequence) =>
        new(name, Id("a"), Id("a"), "first-move", sequence, 0, null, null, null, null, null, null, T0);

    protected static string Id(string key) => Convert.ToHexStringLower(System.Security.Cryptography.SHA256.HashData(Encoding.UTF8.GetBytes(key)));

    private static StoredModel Model(string key, string document = "{}") =>
        new(new StoredModelSummary(Id(key), "model " + key, 2, 1, 2, 10, T0), Encoding.UTF8.GetBytes(document));
}
