using System.Net;
using System.Net.Http.Headers;
using System.Security.Cryptography;
using System.Text;
using System.Text.Json.Nodes;
using Lookahead.Api.Access;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>GET /v1/aliases: a page of the caller's tenant's aliases by name, checked like the other listings.</summary>
public class AliasListingTests
{
    private const string North = "north-list-key-41a7";
    private const string South = "south-list-key-9d02";
    private const string Operator = "operator-list-key-6b3e";

    private static readonly Dictionary<string, string?> Keys = new()
    {
        ["Auth:Keys:0:Hash"] = Hash(North),
        ["Auth:Keys:0:Tenant"] = "north-site",
        ["Auth:Keys:0:Scopes:0"] = AccessScopes.ModelsWrite,
        ["Auth:Keys:0:Scopes:1"] = AccessScopes.PlansRun,
        ["Auth:Keys:1:Hash"] = Hash(South),
        ["Auth:Keys:1:Tenant"] = "south-site",
        ["Auth:Keys:1:Scopes:0"] = AccessScopes.ModelsWrite,
        ["Auth:Keys:1:Scopes:1"] = AccessScopes.PlansRun,
        ["Auth:Keys:2:Hash"] = Hash(Operator),
        ["Auth:Keys:2:Tenant"] = "operations",
        ["Auth:Keys:2:Scopes:0"] = AccessScopes.Admin,
        ["Demo:Tenant"] = "north-site",
    };

    [Fact]
    public async Task Each_tenant_lists_only_its_own_aliases_by_name_a_page_at_a_time()
    {
        await using var factory = new LookaheadFactory(Keys);
        var north = Client(factory, North);
        var south = Client(factory, South);
        var admin = Client(factory, Operator);
        string northModel = await north.RegisterAsync(TestModels.TwoTanks);
        string southModel = await south.RegisterAsync(TestModels.TwoTanks);
        foreach (string name in new[] { "line-b", "line-a" })
        {
            Assert.Equal(HttpStatusCode.Created, (await north.PutAsync($"/v1/aliases/{name}", Json(northModel))).StatusCode);
        }

        Assert.Equal(HttpStatusCode.Created, (await south.PutAsync("/v1/aliases/south-only", Json(southModel))).StatusCode);

        // North has the demo's alias and its own two, by name; a page of two leaves one for the next.
        var first = await (await north.GetAsync("/v1/aliases?limit=2")).ReadJsonAsync();
        Assert.Equal(3, first["total"]!.GetValue<int>());
        Assert.Equal(2, first["limit"]!.GetValue<int>());
        Assert.Equal(["cold-store-demo", "line-a"], Names(first));
        Assert.Equal(northModel, first["items"]![1]!["modelId"]!.GetValue<string>());
        Assert.NotNull(first["items"]![1]!["updatedAt"]);
        var second = await (await north.GetAsync("/v1/aliases?offset=2&limit=2")).ReadJsonAsync();
        Assert.Equal(["line-b"], Names(second));

        var southPage = await (await south.GetAsync("/v1/aliases")).ReadJsonAsync();
        Assert.Equal(["south-only"], Names(southPage));
        Assert.Equal(1, southPage["total"]!.GetValue<int>());

        // Alias names belong to a tenant: an admin key lists its own tenant's (none here), as it reads them.
        Assert.Equal(0, (await (await admin.GetAsync("/v1/aliases")).ReadJsonAsync())["total"]!.GetValue<int>());
    }

    [Fact]
    public async Task Offset_and_limit_out_of_range_are_refused_naming_each()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();

        var errors = await (await client.GetAsync("/v1/aliases?offset=-1&limit=0")).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Equal(["offset", "limit"], errors.Select(e => e.Path));
        var tooMany = await (await client.GetAsync($"/v1/aliases?limit={Lookahead.Api.Http.PageRequest.MaxLimit + 1}")).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Equal("limit", Assert.Single(tooMany).Path);
    }

    [Fact]
    public async Task Listing_aliases_needs_a_key_when_keys_are_configured()
    {
        await using var factory = new LookaheadFactory(Keys);
        await (await factory.CreateClient().GetAsync("/v1/aliases")).ReadProblemAsync(HttpStatusCode.Unauthorized);
    }

    private static List<string> Names(JsonNode page) => page["items"]!.AsArray().Select(i => i!["name"]!.GetValue<string>()).ToList();

    private static StringContent Json(string modelId) => Support.Stations.Json(new JsonObject { ["modelId"] = modelId });

    private static HttpClient Client(LookaheadFactory factory, string key)
    {
        var client = factory.CreateClient();
        client.DefaultRequestHeaders.Authorization = new AuthenticationHeaderValue("Bearer", key);
        return client;
    }

    private static string Hash(string key) => Convert.ToHexStringLower(SHA256.HashData(Encoding.UTF8.GetBytes(key)));
}
