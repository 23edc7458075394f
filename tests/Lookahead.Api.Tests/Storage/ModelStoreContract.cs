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

    protected static string Id(string key) => Convert.ToHexStringLower(System.Security.Cryptography.SHA256.HashData(Encoding.UTF8.GetBytes(key)));

    private static StoredModel Model(string key, string document = "{}") =>
        new(new StoredModelSummary(Id(key), "model " + key, 2, 1, 2, 10, T0), Encoding.UTF8.GetBytes(document));
}
