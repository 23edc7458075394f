using System.Net;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

public class ServiceHealthTests
{
    [Fact]
    public async Task Live_and_ready_answer_200_when_the_store_is_reachable()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();

        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/health/live")).StatusCode);
        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/health/ready")).StatusCode);
    }

    [Fact]
    public async Task Ready_answers_503_when_the_store_cannot_be_opened()
    {
        var blocker = Path.Combine(Path.GetTempPath(), $"lookahead-not-a-folder-{Guid.NewGuid():N}");
        await File.WriteAllTextAsync(blocker, "a file where the database folder should be");
        try
        {
            await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Demo:Enabled"] = "false" }, Path.Combine(blocker, "db", "lookahead.db"));
            var client = factory.CreateClient();

            Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/health/live")).StatusCode);
            Assert.Equal(HttpStatusCode.ServiceUnavailable, (await client.GetAsync("/health/ready")).StatusCode);
        }
        finally
        {
            File.Delete(blocker);
        }
    }

    [Fact]
    public async Task Metrics_expose_compilations_cache_and_plan_latency()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);
        await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[1,0]}""");

        string text = await client.GetStringAsync("/metrics");

        Assert.Contains("lookahead_model_compilations_total", text, StringComparison.Ordinal);
        Assert.Contains("lookahead_model_compile_duration_seconds_count", text, StringComparison.Ordinal);
        Assert.Contains("lookahead_model_cache_hits_total", text, StringComparison.Ordinal);
        Assert.Contains("lookahead_model_cache_misses_total", text, StringComparison.Ordinal);
        Assert.Contains("lookahead_model_cache_evictions_total", text, StringComparison.Ordinal);
        Assert.Contains("lookahead_model_cache_bytes", text, StringComparison.Ordinal);
        Assert.Contains("lookahead_plan_duration_seconds_bucket", text, StringComparison.Ordinal);
        Assert.Contains("http_requests_received_total", text, StringComparison.Ordinal);
        Assert.True(await Metrics.ReadAsync(client, "lookahead_model_cache_bytes") > 0);
    }

    [Fact]
    public async Task Sixteen_concurrent_first_plans_after_a_restart_compile_the_model_exactly_once()
    {
        string id;
        string path;
        await using (var before = new LookaheadFactory { KeepDatabase = true })
        {
            id = await before.CreateClient().RegisterAsync(TestModels.TwoTanks);
            path = before.DatabasePath;
        }

        try
        {
            await using var after = new LookaheadFactory(databasePath: path);
            var client = after.CreateClient();
            double compiled = await Metrics.ReadAsync(client, "lookahead_model_compilations_total");

            var plans = Enumerable.Range(0, 16).Select(_ => client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[0.3,0.1]}""")).ToList();
            var responses = await Task.WhenAll(plans);

            Assert.All(responses, r => Assert.Equal(HttpStatusCode.OK, r.StatusCode));
            Assert.Equal(compiled + 1, await Metrics.ReadAsync(client, "lookahead_model_compilations_total"));
        }
        finally
        {
            Directory.Delete(Path.GetDirectoryName(path)!, recursive: true);
        }
    }

    [Fact]
    public async Task A_cache_too_small_for_two_models_evicts_the_least_recent_and_recompiles_on_demand()
    {
        // Each double-integrator variant weighs about 6 kB in the cache; 10 kB holds one of them.
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Cache:SizeLimitBytes"] = "10000", ["Demo:Enabled"] = "false" });
        var client = factory.CreateClient();
        string first = await client.RegisterAsync(TestModels.DoubleIntegrator);
        var longer = TestModels.Node(TestModels.DoubleIntegrator);
        longer["cost"]!["horizon"] = 11;
        string second = await client.RegisterAsync(longer.ToJsonString());

        var plan = await client.PostJsonAsync($"/v1/models/{first}/plan", """{"state":[1,0]}""");

        Assert.Equal(HttpStatusCode.OK, plan.StatusCode);
        Assert.Equal(1, await Metrics.ReadAsync(client, "lookahead_model_cache_misses_total"));
        Assert.Equal(3, await Metrics.ReadAsync(client, "lookahead_model_compilations_total"));
        Assert.Equal(1, await Metrics.ReadAsync(client, "lookahead_model_cache_entries"));
        Assert.NotEqual(first, second);
    }

    [Fact]
    public async Task The_demo_model_is_registered_at_start_under_its_alias_with_the_same_id_every_start()
    {
        string id;
        string path;
        await using (var first = new LookaheadFactory { KeepDatabase = true })
        {
            var alias = await (await first.CreateClient().GetAsync("/v1/aliases/cold-store-demo")).ReadJsonAsync();
            id = alias["modelId"]!.GetValue<string>();
            path = first.DatabasePath;
        }

        try
        {
            await using var second = new LookaheadFactory(databasePath: path);
            var client = second.CreateClient();
            var alias = await (await client.GetAsync("/v1/aliases/cold-store-demo")).ReadJsonAsync();
            var model = await (await client.GetAsync($"/v1/models/{id}")).ReadJsonAsync();

            Assert.Equal(id, alias["modelId"]!.GetValue<string>());
            Assert.Single(alias["history"]!.AsArray());
            Assert.Equal(3, model["dimensions"]!["n"]!.GetValue<int>());
            Assert.Equal(["chiller_1", "chiller_2", "door_fan"], model["document"]!["labels"]!["inputs"]!.AsArray().Select(v => v!.GetValue<string>()));
            Assert.Equal(60, model["document"]!["plant"]!["sampleTime"]!.GetValue<double>());
        }
        finally
        {
            Directory.Delete(Path.GetDirectoryName(path)!, recursive: true);
        }
    }

    [Fact]
    public async Task Rate_limiting_refuses_with_429_over_the_configured_allowance()
    {
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["RateLimiting:PermitLimit"] = "2", ["RateLimiting:WindowSeconds"] = "3600" });
        var client = factory.CreateClient();

        var statuses = new List<HttpStatusCode>();
        for (int i = 0; i < 3; i++)
        {
            statuses.Add((await client.GetAsync("/v1/models")).StatusCode);
        }

        Assert.Equal([HttpStatusCode.OK, HttpStatusCode.OK, (HttpStatusCode)429], statuses);
        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/health/live")).StatusCode);
    }
}
