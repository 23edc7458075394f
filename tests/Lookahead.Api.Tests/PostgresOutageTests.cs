using System.Net;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>A real PostgreSQL of the test's own, stopped and started under a running service.</summary>
public class PostgresOutageTests
{
    [PostgresServerFact]
    public async Task Plans_go_on_from_cache_writes_answer_503_and_the_service_recovers_without_a_restart_when_PostgreSQL_returns()
    {
        await using var postgres = await ThrowawayPostgres.StartAsync();
        await using var factory = new LookaheadFactory(new Dictionary<string, string?>
        {
            ["Store:Provider"] = "postgres",
            ["Store:PostgresConnectionString"] = postgres.ConnectionString,
            ["Demo:Enabled"] = "false",

            // Every alias plan asks the store, so the outage fallback (not the freshness window) is what answers.
            ["Cache:AliasSeconds"] = "0",
        });
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);
        Assert.Equal(HttpStatusCode.Created, (await client.PutAsync("/v1/aliases/line", StoreFaultTests.AliasBody(id))).StatusCode);
        Assert.Equal(HttpStatusCode.OK, (await client.PostJsonAsync("/v1/aliases/line/plan", """{"state":[1,0]}""")).StatusCode);
        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/health/ready")).StatusCode);

        await postgres.StopAsync();

        Assert.Equal(HttpStatusCode.OK, (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[1,0]}""")).StatusCode);
        var byAlias = await client.PostJsonAsync("/v1/aliases/line/plan", """{"state":[1,0]}""");
        Assert.Equal(HttpStatusCode.OK, byAlias.StatusCode);
        Assert.Equal(id, (await byAlias.ReadJsonAsync())["modelId"]!.GetValue<string>());
        await StoreFaultTests.AssertStoreUnavailableAsync(await client.PostJsonAsync("/v1/models", TestModels.TwoTanks));
        await StoreFaultTests.AssertStoreUnavailableAsync(await client.GetAsync("/v1/models"));
        await StoreFaultTests.AssertStoreUnavailableAsync(await client.PostJsonAsync("/v1/aliases/never-seen/plan", """{"state":[1,0]}"""));
        Assert.Equal(HttpStatusCode.ServiceUnavailable, (await client.GetAsync("/health/ready")).StatusCode);

        await postgres.StartAgainAsync();

        // Readiness is polled as an orchestrator would; the service itself is not restarted.
        var deadline = DateTime.UtcNow.AddSeconds(30);
        HttpStatusCode ready;
        while ((ready = (await client.GetAsync("/health/ready")).StatusCode) != HttpStatusCode.OK && DateTime.UtcNow < deadline)
        {
            await Task.Delay(200);
        }

        Assert.Equal(HttpStatusCode.OK, ready);
        await client.RegisterAsync(TestModels.TwoTanks);
        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/v1/models")).StatusCode);
    }
}
