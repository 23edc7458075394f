using System.Diagnostics;
using System.Net;
using Lookahead.Api.Catalog;
using Lookahead.Api.Tests.Support;
using Microsoft.AspNetCore.Mvc.Testing;
using Microsoft.AspNetCore.TestHost;
using Microsoft.Extensions.DependencyInjection;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// Compiles run within their budgets: bounded slots and queue, a memory estimate checked before starting, a time
/// budget, and cancellation when the client leaves. Compiles are held by <see cref="HeldCompilation"/>, so which
/// request finds the slot busy is decided by the test, not by timing.
/// </summary>
public class CompileBudgetTests
{
    private static (LookaheadFactory Factory, WebApplicationFactory<Program> Host, HeldCompilation Held) Start(Dictionary<string, string?> settings)
    {
        settings["Demo:Enabled"] = "false";
        var held = new HeldCompilation();
        var factory = new LookaheadFactory(settings);
        var host = factory.WithWebHostBuilder(b => b.ConfigureTestServices(s => s.AddSingleton<IModelCompilation>(held)));
        return (factory, host, held);
    }

    [Fact]
    public async Task A_registration_beyond_the_queue_is_answered_503_with_retry_after_and_goes_through_once_the_slot_is_free()
    {
        var (factory, host, held) = Start(new() { ["Compile:MaxConcurrent"] = "1", ["Compile:QueueLimit"] = "0" });
        await using var _ = factory;
        await using var __ = host;
        var client = Client(host);
        var metrics = host.Services.GetRequiredService<CatalogMetrics>();

        var first = client.PostJsonAsync("/v1/models", TestModels.DoubleIntegrator);
        await held.WaitForStartAsync();
        var second = await client.PostJsonAsync("/v1/models", TestModels.TwoTanks);

        Assert.Equal(HttpStatusCode.ServiceUnavailable, second.StatusCode);
        Assert.Equal(TimeSpan.FromSeconds(CompileRefusedException.RetryAfterSeconds), second.Headers.RetryAfter?.Delta);
        var problem = await second.ReadJsonAsync();
        Assert.Equal("urn:lookahead:problem:unavailable", problem["type"]!.GetValue<string>());
        Assert.Equal(1, metrics.CompilesRefused.WithLabels("queue").Value);
        Assert.Single(held.Started);

        held.Open();
        Assert.Equal(HttpStatusCode.Created, (await first).StatusCode);
        Assert.Equal(HttpStatusCode.Created, (await client.PostJsonAsync("/v1/models", TestModels.TwoTanks)).StatusCode);
    }

    [Fact]
    public async Task Registrations_wait_in_the_queue_up_to_its_limit_and_all_complete()
    {
        var (factory, host, held) = Start(new() { ["Compile:MaxConcurrent"] = "1", ["Compile:QueueLimit"] = "2" });
        await using var _ = factory;
        await using var __ = host;
        var client = Client(host);
        var metrics = host.Services.GetRequiredService<CatalogMetrics>();

        var first = client.PostJsonAsync("/v1/models", TestModels.DoubleIntegrator);
        await held.WaitForStartAsync();
        var queued = new[] { client.PostJsonAsync("/v1/models", TestModels.TwoTanks), client.PostJsonAsync("/v1/models", TestModels.TwoZonesWithEstimator) };
        await WaitUntilAsync(() => metrics.CompilesQueued.Value == 2);
        Assert.Single(held.Started);

        held.Open();
        Assert.Equal(HttpStatusCode.Created, (await first).StatusCode);
        foreach (var response in await Task.WhenAll(queued))
        {
            Assert.Equal(HttpStatusCode.Created, response.StatusCode);
        }

        Assert.Equal(0, metrics.CompilesRefused.WithLabels("queue").Value);
        Assert.Equal(0, metrics.CompilesQueued.Value);
        Assert.Equal(0, metrics.CompilesRunning.Value);
    }

    [Fact]
    public async Task A_model_larger_than_one_model_may_be_is_refused_400_naming_the_horizon_before_compiling()
    {
        var (factory, host, held) = Start(new() { ["Compile:MaxModelBytes"] = "1024" });
        await using var _ = factory;
        await using var __ = host;

        var response = await Client(host).PostJsonAsync("/v1/models", TestModels.DoubleIntegrator);

        var errors = await response.ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(errors, e => e.Path == "cost.horizon" && e.Reason.Contains("horizon 10", StringComparison.Ordinal));
        Assert.Empty(held.Started);
    }

    [Fact]
    public async Task A_compile_that_would_overdraw_the_memory_budget_of_those_in_flight_is_refused_503()
    {
        // Each of the two small models fits the budget alone, not both at once.
        long one = Lookahead.Core.Planning.CompiledSizeEstimate.Bytes(Document(TestModels.DoubleIntegrator));
        long other = Lookahead.Core.Planning.CompiledSizeEstimate.Bytes(Document(TestModels.TwoTanks));
        long budget = Math.Max(Math.Max(one, other), 1024) + (Math.Min(one, other) / 2);
        var (factory, host, held) = Start(new()
        {
            ["Compile:MaxConcurrent"] = "4",
            ["Compile:MaxModelBytes"] = budget.ToString(System.Globalization.CultureInfo.InvariantCulture),
            ["Compile:MemoryBudgetBytes"] = budget.ToString(System.Globalization.CultureInfo.InvariantCulture),
        });
        await using var _ = factory;
        await using var __ = host;
        var client = Client(host);
        var metrics = host.Services.GetRequiredService<CatalogMetrics>();

        var first = client.PostJsonAsync("/v1/models", TestModels.DoubleIntegrator);
        await held.WaitForStartAsync();
        var second = await client.PostJsonAsync("/v1/models", TestModels.TwoTanks);

        Assert.Equal(HttpStatusCode.ServiceUnavailable, second.StatusCode);
        Assert.NotNull(second.Headers.RetryAfter);
        Assert.Equal(1, metrics.CompilesRefused.WithLabels("memory").Value);
        held.Open();
        Assert.Equal(HttpStatusCode.Created, (await first).StatusCode);
        Assert.Equal(HttpStatusCode.Created, (await client.PostJsonAsync("/v1/models", TestModels.TwoTanks)).StatusCode);
    }

    [Fact]
    public async Task A_compile_past_its_time_budget_is_cancelled_and_answered_503()
    {
        var (factory, host, held) = Start(new() { ["Compile:TimeoutSeconds"] = "1" });
        await using var _ = factory;
        await using var __ = host;
        var client = Client(host);
        var metrics = host.Services.GetRequiredService<CatalogMetrics>();

        var clock = Stopwatch.StartNew();
        var response = await client.PostJsonAsync("/v1/models", TestModels.DoubleIntegrator);
        clock.Stop();

        Assert.Equal(HttpStatusCode.ServiceUnavailable, response.StatusCode);
        Assert.NotNull(response.Headers.RetryAfter);
        Assert.Equal(["double-integrator"], held.Cancelled);
        Assert.Equal(1, metrics.CompilesRefused.WithLabels("timeout").Value);
        Assert.Equal(0, metrics.CompilesRunning.Value);
        // A guard against a compile that ignores its budget, not a speed test.
        Assert.True(clock.Elapsed < TimeSpan.FromSeconds(20), $"answered after {clock.Elapsed}");
        held.Open();
        Assert.Equal(HttpStatusCode.Created, (await client.PostJsonAsync("/v1/models", TestModels.DoubleIntegrator)).StatusCode);
    }

    [Fact]
    public async Task A_registration_whose_client_leaves_while_queued_is_never_compiled()
    {
        var (factory, host, held) = Start(new() { ["Compile:MaxConcurrent"] = "1", ["Compile:QueueLimit"] = "4" });
        await using var _ = factory;
        await using var __ = host;
        var client = Client(host);
        var metrics = host.Services.GetRequiredService<CatalogMetrics>();

        var first = client.PostJsonAsync("/v1/models", TestModels.DoubleIntegrator);
        await held.WaitForStartAsync();
        using var leaving = new CancellationTokenSource();
        var second = client.PostAsync("/v1/models", new StringContent(TestModels.TwoTanks, System.Text.Encoding.UTF8, "application/json"), leaving.Token);
        await WaitUntilAsync(() => metrics.CompilesQueued.Value == 1);
        leaving.Cancel();
        await Assert.ThrowsAnyAsync<OperationCanceledException>(() => second);
        await WaitUntilAsync(() => metrics.CompilesQueued.Value == 0);

        held.Open();
        Assert.Equal(HttpStatusCode.Created, (await first).StatusCode);
        Assert.Equal(["double-integrator"], held.Started);
        Assert.Equal(1, metrics.Compilations.Value);
        Assert.Equal(1, metrics.CompilesAbandoned.WithLabels("queued").Value);
        var listing = await (await client.GetAsync("/v1/models")).ReadJsonAsync();
        Assert.DoesNotContain("two-tanks", listing.ToJsonString(), StringComparison.Ordinal);
    }

    /// <summary>A client that gives up after 30 s, so a budget that fails to refuse fails the test instead of hanging it.</summary>
    private static HttpClient Client(WebApplicationFactory<Program> host)
    {
        var client = host.CreateClient();
        client.Timeout = TimeSpan.FromSeconds(30);
        return client;
    }

    private static Lookahead.Core.Models.ModelDocument Document(string json)
    {
        var dto = System.Text.Json.JsonSerializer.Deserialize<ModelDocumentDto>(json, Lookahead.Api.Http.ApiJson.Create(new Lookahead.Api.Http.RequestLimitsOptions()))!;
        var errors = new List<Lookahead.Core.Validation.ValidationError>();
        var document = ModelDocumentMapping.ToCore(ModelDocumentMapping.Normalise(dto), errors);
        Assert.Empty(errors);
        return document;
    }

    /// <summary>Polls a condition the service reaches on its own, bounded so a broken budget fails instead of hanging.</summary>
    private static async Task WaitUntilAsync(Func<bool> condition)
    {
        var deadline = Stopwatch.StartNew();
        while (!condition())
        {
            if (deadline.Elapsed > TimeSpan.FromSeconds(30))
            {
                throw new TimeoutException("the condition did not hold within 30 s");
            }

            await Task.Delay(10);
        }
    }
}
