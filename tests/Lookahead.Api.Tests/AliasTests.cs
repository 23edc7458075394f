using System.Net;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

public class AliasTests
{
    [Fact]
    public async Task An_alias_is_created_moved_and_remembers_its_history()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string first = await client.RegisterAsync(TestModels.DoubleIntegrator);
        string second = await client.RegisterAsync(TestModels.TwoTanks);

        var created = await client.PutAsync("/v1/aliases/line-3.station_a", JsonContent(first));
        var moved = await client.PutAsync("/v1/aliases/line-3.station_a", JsonContent(second));
        var unchanged = await client.PutAsync("/v1/aliases/line-3.station_a", JsonContent(second));
        var alias = await (await client.GetAsync("/v1/aliases/line-3.station_a")).ReadJsonAsync();

        Assert.Equal(HttpStatusCode.Created, created.StatusCode);
        Assert.Equal(HttpStatusCode.OK, moved.StatusCode);
        Assert.Equal(HttpStatusCode.OK, unchanged.StatusCode);
        Assert.Equal(second, alias["modelId"]!.GetValue<string>());
        var history = alias["history"]!.AsArray();
        Assert.Equal([first, second], history.Select(h => h!["modelId"]!.GetValue<string>()));
        Assert.All(history, h => Assert.True(DateTimeOffset.TryParse(h!["setAt"]!.GetValue<string>(), System.Globalization.CultureInfo.InvariantCulture, out _)));
    }

    [Fact]
    public async Task Planning_through_an_alias_uses_its_current_model_and_says_which()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);
        await client.PutAsync("/v1/aliases/station", JsonContent(id));

        var plan = await (await client.PostJsonAsync("/v1/aliases/station/plan", """{"state":[1,0]}""")).ReadJsonAsync();
        var direct = await (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[1,0]}""")).ReadJsonAsync();

        Assert.Equal(id, plan["modelId"]!.GetValue<string>());
        Assert.Equal("station", plan["alias"]!.GetValue<string>());
        Assert.Equal(direct["inputs"]!.ToJsonString(), plan["inputs"]!.ToJsonString());
    }

    [Fact]
    public async Task A_model_an_alias_points_at_cannot_be_deleted_and_the_problem_names_the_alias()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);
        await client.PutAsync("/v1/aliases/keeper", JsonContent(id));

        var response = await client.DeleteAsync($"/v1/models/{id}");
        string body = await response.Content.ReadAsStringAsync();
        await response.ReadProblemAsync(HttpStatusCode.Conflict);

        Assert.Contains("keeper", body, StringComparison.Ordinal);
        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync($"/v1/models/{id}")).StatusCode);
        Assert.Equal(HttpStatusCode.NoContent, (await client.DeleteAsync("/v1/aliases/keeper")).StatusCode);
        Assert.Equal(HttpStatusCode.NoContent, (await client.DeleteAsync($"/v1/models/{id}")).StatusCode);
    }

    [Fact]
    public async Task Bad_alias_names_targets_and_unknown_aliases_are_refused()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();

        await (await client.PutAsync("/v1/aliases/Upper_Case", JsonContent(new string('0', 64)))).ReadProblemAsync(HttpStatusCode.BadRequest);
        var malformed = await (await client.PutAsync("/v1/aliases/ok", JsonContent("nope"))).ReadProblemAsync(HttpStatusCode.BadRequest);
        var unknown = await (await client.PutAsync("/v1/aliases/ok", JsonContent(new string('0', 64)))).ReadProblemAsync(HttpStatusCode.NotFound);
        await (await client.GetAsync("/v1/aliases/never-set")).ReadProblemAsync(HttpStatusCode.NotFound);
        await (await client.PostJsonAsync("/v1/aliases/never-set/plan", """{"state":[1]}""")).ReadProblemAsync(HttpStatusCode.NotFound);

        Assert.Contains(malformed, e => e.Path == "modelId");
        Assert.Contains(unknown, e => e.Path == "modelId");
    }

    private static StringContent JsonContent(string modelId) =>
        new(new JsonObject { ["modelId"] = modelId }.ToJsonString(), System.Text.Encoding.UTF8, "application/json");
}
