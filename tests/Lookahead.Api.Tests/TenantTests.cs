using System.Net;
using System.Net.Http.Headers;
using System.Security.Cryptography;
using System.Text;
using System.Text.Json.Nodes;
using Lookahead.Api.Access;
using Lookahead.Api.Tests.Support;
using Microsoft.AspNetCore.Mvc.Testing;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// Tenants through the HTTP contract: a key's tenant sees only its own models, aliases and stations (404 for the rest,
/// the same answer as for what does not exist), registering content another tenant holds answers exactly like a new
/// registration, an admin key lists and reads across tenants, and alias history names the key of each change.
/// </summary>
public class TenantTests
{
    private const string North = "north-key-5c0e71";
    private const string South = "south-key-b2d94a";
    private const string Operator = "operator-key-7f31c8";

    private static readonly Dictionary<string, string?> Keys = new()
    {
        ["Auth:Keys:0:Hash"] = Hash(North),
        ["Auth:Keys:0:Tenant"] = "north-site",
        ["Auth:Keys:0:Scopes:0"] = AccessScopes.ModelsWrite,
        ["Auth:Keys:0:Scopes:1"] = AccessScopes.PlansRun,
        ["Auth:Keys:0:Scopes:2"] = AccessScopes.StationsStep,
        ["Auth:Keys:1:Hash"] = Hash(South),
        ["Auth:Keys:1:Tenant"] = "south-site",
        ["Auth:Keys:1:Scopes:0"] = AccessScopes.ModelsWrite,
        ["Auth:Keys:1:Scopes:1"] = AccessScopes.PlansRun,
        ["Auth:Keys:1:Scopes:2"] = AccessScopes.StationsStep,
        ["Auth:Keys:2:Hash"] = Hash(Operator),
        ["Auth:Keys:2:Tenant"] = "operations",
        ["Auth:Keys:2:Scopes:0"] = AccessScopes.Admin,
        ["Demo:Tenant"] = "north-site",
    };

    [Fact]
    public async Task A_tenant_sees_only_its_own_models_and_a_registration_never_tells_it_what_others_hold()
    {
        await using var factory = new LookaheadFactory(Keys);
        var north = Client(factory, North);
        var south = Client(factory, South);

        var first = await north.PostJsonAsync("/v1/models", TestModels.TwoTanks);
        Assert.Equal(HttpStatusCode.Created, first.StatusCode);
        string id = (await first.ReadJsonAsync())["id"]!.GetValue<string>();

        // Everything about another tenant's model answers as if it did not exist.
        string unknown = new('0', 64);
        foreach (string model in new[] { id, unknown })
        {
            await (await south.GetAsync($"/v1/models/{model}")).ReadProblemAsync(HttpStatusCode.NotFound);
            await (await south.PostJsonAsync($"/v1/models/{model}/plan", """{"state":[0.5,-0.2]}""")).ReadProblemAsync(HttpStatusCode.NotFound);
            await (await south.GetAsync($"/v1/models/{model}/gain")).ReadProblemAsync(HttpStatusCode.NotFound);
            await (await south.DeleteAsync($"/v1/models/{model}")).ReadProblemAsync(HttpStatusCode.NotFound);
            await (await south.PutAsync("/v1/aliases/borrowed", Json(new JsonObject { ["modelId"] = model }))).ReadProblemAsync(HttpStatusCode.NotFound);
        }

        Assert.Equal(0, (await (await south.GetAsync("/v1/models")).ReadJsonAsync())["total"]!.GetValue<int>());

        // The same content registered by the other tenant: 201 with the same body a first registration gets.
        var second = await south.PostJsonAsync("/v1/models", TestModels.TwoTanks);
        Assert.Equal(HttpStatusCode.Created, second.StatusCode);
        Assert.Equal((await first.ReadJsonAsync()).ToJsonString(), (await second.ReadJsonAsync()).ToJsonString());
        Assert.Equal(HttpStatusCode.OK, (await south.PostJsonAsync("/v1/models", TestModels.TwoTanks)).StatusCode);

        // Each tenant's delete ends only its own hold.
        Assert.Equal(HttpStatusCode.NoContent, (await north.DeleteAsync($"/v1/models/{id}")).StatusCode);
        await (await north.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[0.5,-0.2]}""")).ReadProblemAsync(HttpStatusCode.NotFound);
        Assert.Equal(HttpStatusCode.OK, (await south.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[0.5,-0.2]}""")).StatusCode);
    }

    [Fact]
    public async Task Aliases_and_stations_live_in_their_tenant_and_admin_lists_across_tenants()
    {
        await using var factory = new LookaheadFactory(Keys);
        var north = Client(factory, North);
        var south = Client(factory, South);
        var admin = Client(factory, Operator);

        // The demo is registered for the tenant Demo:Tenant names, and only that tenant sees its alias.
        Assert.Equal(HttpStatusCode.OK, (await north.GetAsync("/v1/aliases/cold-store-demo")).StatusCode);
        await (await south.GetAsync("/v1/aliases/cold-store-demo")).ReadProblemAsync(HttpStatusCode.NotFound);

        string northModel = await north.RegisterAsync(TestModels.TwoZonesWithEstimator);
        string southModel = await south.RegisterAsync(TestModels.TwoTanks);
        Assert.Equal(HttpStatusCode.Created, (await north.PutAsync("/v1/aliases/line", Json(new JsonObject { ["modelId"] = northModel }))).StatusCode);
        Assert.Equal(HttpStatusCode.Created, (await south.PutAsync("/v1/aliases/line", Json(new JsonObject { ["modelId"] = southModel }))).StatusCode);
        var northAlias = await (await north.GetAsync("/v1/aliases/line")).ReadJsonAsync();
        Assert.Equal(northModel, northAlias["modelId"]!.GetValue<string>());
        Assert.Equal(Hash(North)[..12], northAlias["history"]![0]!["changedBy"]!.GetValue<string>());
        Assert.Equal(southModel, (await (await south.GetAsync("/v1/aliases/line")).ReadJsonAsync())["modelId"]!.GetValue<string>());
        var southPlan = await (await south.PostJsonAsync("/v1/aliases/line/plan", """{"state":[0.5,-0.2]}""")).ReadJsonAsync();
        Assert.Equal(southModel, southPlan["modelId"]!.GetValue<string>());

        // A station of the same name in each tenant; each sees and steps its own.
        await Support.Stations.BindAsync(north, "unit-1", "line");
        await (await south.GetAsync("/v1/stations/unit-1")).ReadProblemAsync(HttpStatusCode.NotFound);
        await (await south.PostAsync("/v1/stations/unit-1/step", Json(Support.Stations.StepBody(0, [0.1, 0.2], null, null)))).ReadProblemAsync(HttpStatusCode.NotFound);
        var step = await Support.Stations.StepAsync(north, "unit-1", 0, [0.1, 0.2], null, null);
        Assert.Equal(1, step["sequence"]!.GetValue<long>());
        Assert.Equal(0, (await (await south.GetAsync("/v1/stations")).ReadJsonAsync())["total"]!.GetValue<int>());
        await (await south.DeleteAsync("/v1/stations/unit-1")).ReadProblemAsync(HttpStatusCode.NotFound);
        Assert.Equal(HttpStatusCode.OK, (await north.GetAsync("/v1/stations/unit-1")).StatusCode);

        // The admin key lists every tenant's models (the demo, north's and south's) and reads any of them.
        var all = (await (await admin.GetAsync("/v1/models?limit=50")).ReadJsonAsync())["items"]!.AsArray().Select(i => i!["id"]!.GetValue<string>()).ToList();
        Assert.Contains(northModel, all);
        Assert.Contains(southModel, all);
        Assert.Equal(HttpStatusCode.OK, (await admin.GetAsync($"/v1/models/{southModel}")).StatusCode);
        var northList = (await (await north.GetAsync("/v1/models?limit=50")).ReadJsonAsync())["items"]!.AsArray().Select(i => i!["id"]!.GetValue<string>()).ToList();
        Assert.DoesNotContain(southModel, northList);
    }

    private static StringContent Json(JsonNode node) => Support.Stations.Json(node);

    private static HttpClient Client(WebApplicationFactory<Program> factory, string key)
    {
        var client = factory.CreateClient();
        client.DefaultRequestHeaders.Authorization = new AuthenticationHeaderValue("Bearer", key);
        return client;
    }

    private static string Hash(string key) => Convert.ToHexStringLower(SHA256.HashData(Encoding.UTF8.GetBytes(key)));
}
