using System.Net;
using System.Text;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Microsoft.Data.Sqlite;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>The SQLite store's faults: a file deleted or replaced under the service, a store that cannot be written or opened.</summary>
public class StoreFaultTests
{
    private static readonly Dictionary<string, string?> NoDemo = new() { ["Demo:Enabled"] = "false" };

    [Fact]
    public async Task A_deleted_database_file_fails_readiness_and_refuses_writes_with_503_while_cached_plans_go_on()
    {
        await using var factory = new LookaheadFactory(NoDemo);
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);
        Assert.Equal(HttpStatusCode.Created, (await client.PutAsync("/v1/aliases/line", AliasBody(id))).StatusCode);
        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/health/ready")).StatusCode);

        File.Delete(factory.DatabasePath);

        await AssertStoreUnavailableAsync(await client.PostJsonAsync("/v1/models", TestModels.TwoTanks));
        await AssertStoreUnavailableAsync(await client.PutAsync("/v1/aliases/other", AliasBody(id)));
        await AssertStoreUnavailableAsync(await client.GetAsync("/v1/models"));
        Assert.Equal(HttpStatusCode.ServiceUnavailable, (await client.GetAsync("/health/ready")).StatusCode);
        Assert.Equal(HttpStatusCode.OK, (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[1,0]}""")).StatusCode);

        // Nothing opened a fresh, empty store in the file's place.
        Assert.False(File.Exists(factory.DatabasePath));
    }

    [Fact]
    public async Task Readiness_probes_through_an_outage_log_the_cause_once_not_a_stack_trace_each()
    {
        var events = new System.Collections.Concurrent.ConcurrentQueue<Serilog.Events.LogEvent>();
        await using var factory = new LookaheadFactory(NoDemo);
        var host = factory.WithWebHostBuilder(b => Microsoft.AspNetCore.TestHost.WebHostBuilderExtensions.ConfigureTestServices(
            b, s => Microsoft.Extensions.DependencyInjection.ServiceCollectionServiceExtensions.AddSingleton<Serilog.Core.ILogEventSink>(s, new Sink(events))));
        var client = host.CreateClient();
        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/health/ready")).StatusCode);

        File.Delete(factory.DatabasePath);
        for (int probe = 0; probe < 5; probe++)
        {
            Assert.Equal(HttpStatusCode.ServiceUnavailable, (await client.GetAsync("/health/ready")).StatusCode);
        }

        var withCause = events.Where(e => e.Exception is not null).ToList();
        Assert.True(withCause.Count == 1, string.Join("\n", withCause.Select(e => $"{e.Properties.GetValueOrDefault("SourceContext")}: {e.RenderMessage()}")));
        var warning = Assert.Single(withCause);
        Assert.Contains("StoreHealthCheck", warning.Properties["SourceContext"].ToString(), StringComparison.Ordinal);
    }

    private sealed class Sink(System.Collections.Concurrent.ConcurrentQueue<Serilog.Events.LogEvent> events) : Serilog.Core.ILogEventSink
    {
        public void Emit(Serilog.Events.LogEvent logEvent) => events.Enqueue(logEvent);
    }

    [Fact]
    public async Task A_station_step_after_the_database_file_was_deleted_is_refused_with_503_not_acknowledged()
    {
        await using var factory = new LookaheadFactory(NoDemo);
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.TwoZonesWithEstimator);
        await Support.Stations.BindAsync(client, "zone", id);
        await Support.Stations.StepAsync(client, "zone", 0, [-20.5, -19.8], [60, 60]);

        File.Delete(factory.DatabasePath);

        await AssertStoreUnavailableAsync(await client.PostJsonAsync("/v1/stations/zone/step", Support.Stations.StepBody(1, [-20.4, -19.9], [60, 60], null)));
    }

    [Fact]
    public async Task A_database_file_replaced_by_another_is_detected_and_the_refused_registration_is_written_nowhere()
    {
        await using var factory = new LookaheadFactory(NoDemo);
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        // Another SQLite database renamed over the store's file, as a careless restore would.
        string other = factory.DatabasePath + ".other";
        await using (var connection = new SqliteConnection($"Data Source={other};Pooling=false"))
        {
            await connection.OpenAsync();
            await using var command = connection.CreateCommand();
            command.CommandText = "CREATE TABLE unrelated (x INTEGER)";
            await command.ExecuteNonQueryAsync();
        }

        File.Move(other, factory.DatabasePath, overwrite: true);

        await AssertStoreUnavailableAsync(await client.PostJsonAsync("/v1/models", TestModels.TwoTanks));
        Assert.Equal(HttpStatusCode.ServiceUnavailable, (await client.GetAsync("/health/ready")).StatusCode);
        Assert.Equal(HttpStatusCode.OK, (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[1,0]}""")).StatusCode);
        await using (var connection = new SqliteConnection($"Data Source={factory.DatabasePath};Mode=ReadOnly;Pooling=false"))
        {
            await connection.OpenAsync();
            await using var command = connection.CreateCommand();

            // The old -wal file beside it may show the old tables through the new file; either way only the first model is there.
            command.CommandText = "SELECT COUNT(*) FROM sqlite_master WHERE name = 'models'";
            if ((long)(await command.ExecuteScalarAsync())! == 1)
            {
                command.CommandText = "SELECT COUNT(*) FROM models WHERE id <> $id";
                command.Parameters.AddWithValue("$id", id);
                Assert.Equal(0L, (long)(await command.ExecuteScalarAsync())!);
            }
        }
    }

    [Fact]
    public async Task A_store_that_cannot_be_opened_answers_registrations_503_not_500()
    {
        var blocker = Path.Combine(Path.GetTempPath(), $"lookahead-not-a-folder-{Guid.NewGuid():N}");
        await File.WriteAllTextAsync(blocker, "a file where the database folder should be");
        try
        {
            await using var factory = new LookaheadFactory(NoDemo, Path.Combine(blocker, "db", "lookahead.db"));
            var client = factory.CreateClient();

            await AssertStoreUnavailableAsync(await client.PostJsonAsync("/v1/models", TestModels.DoubleIntegrator));
        }
        finally
        {
            File.Delete(blocker);
        }
    }

    [Fact]
    public async Task The_service_refuses_to_start_on_a_read_only_database_file_saying_why()
    {
        string path;
        await using (var first = new LookaheadFactory(NoDemo) { KeepDatabase = true })
        {
            await first.CreateClient().RegisterAsync(TestModels.DoubleIntegrator);
            path = first.DatabasePath;
        }

        SqliteConnection.ClearAllPools();
        try
        {
            await using var readOnly = await ReadOnlyPath.MakeAsync(path) ?? throw new InvalidOperationException("cannot make a file read-only here (needs chattr as root)");
            await using var second = new LookaheadFactory(NoDemo, path);

            var refusal = Record.Exception(() => second.CreateClient());

            Assert.NotNull(refusal);
            Assert.Contains("is read-only", refusal.ToString(), StringComparison.Ordinal);
            Assert.Contains(path, refusal.ToString(), StringComparison.Ordinal);
        }
        finally
        {
            Directory.Delete(Path.GetDirectoryName(path)!, recursive: true);
        }
    }

    [Fact]
    public async Task The_service_refuses_to_start_when_the_database_folder_is_read_only()
    {
        string path;
        await using (var first = new LookaheadFactory(NoDemo) { KeepDatabase = true })
        {
            await first.CreateClient().RegisterAsync(TestModels.DoubleIntegrator);
            path = first.DatabasePath;
        }

        SqliteConnection.ClearAllPools();
        string folder = Path.GetDirectoryName(path)!;
        try
        {
            await using var readOnly = await ReadOnlyPath.MakeAsync(folder) ?? throw new InvalidOperationException("cannot make a folder read-only here (needs chattr as root)");
            await using var second = new LookaheadFactory(NoDemo, path);

            var refusal = Record.Exception(() => second.CreateClient());

            Assert.NotNull(refusal);
            Assert.Contains("is read-only", refusal.ToString(), StringComparison.Ordinal);
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }

    internal static StringContent AliasBody(string modelId) => new($$"""{"modelId":"{{modelId}}"}""", Encoding.UTF8, "application/json");

    /// <summary>A 503 problem of type "unavailable" with a Retry-After of a few seconds, naming no connection setting.</summary>
    internal static async Task AssertStoreUnavailableAsync(HttpResponseMessage response)
    {
        string body = await response.Content.ReadAsStringAsync();
        await response.ReadProblemAsync(HttpStatusCode.ServiceUnavailable);
        Assert.Equal("urn:lookahead:problem:unavailable", JsonNode.Parse(body)!["type"]!.GetValue<string>());
        var retryAfter = response.Headers.RetryAfter?.Delta;
        Assert.True(retryAfter is { TotalSeconds: >= 1 and <= 60 }, $"Retry-After: {response.Headers.RetryAfter}");
        Assert.DoesNotContain("Host=", body, StringComparison.OrdinalIgnoreCase);
        Assert.DoesNotContain("Username", body, StringComparison.OrdinalIgnoreCase);
        Assert.DoesNotContain(".db", body, StringComparison.Ordinal);
    }
}
