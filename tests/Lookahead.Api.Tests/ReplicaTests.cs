using System.Diagnostics;
using System.Net;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;
using Xunit.Abstractions;
using StationRequests = Lookahead.Api.Tests.Support.Stations;

namespace Lookahead.Api.Tests;

/// <summary>
/// Three service processes on one PostgreSQL behind a real nginx (<see cref="ReplicaSet"/>): what one replica is told,
/// the others answer alike, and nginx's retries keep a killed or restarting replica from losing requests.
/// </summary>
public sealed class ReplicaTests(ITestOutputHelper log)
{
    private const string PlanBody = """{"state":[1,0]}""";

    /// <summary>
    /// How late another replica may see a change: an alias resolution is remembered for Cache:AliasSeconds, a compiled
    /// model is confirmed against the store every Cache:ModelSeconds (both 1 s here); a step and a model's document are
    /// read from the store. The rest is slack for a loaded CI machine.
    /// </summary>
    private static readonly TimeSpan PropagationBound = TimeSpan.FromSeconds(ReplicaSet.AliasSeconds + 1);

    [ReplicaFact]
    public async Task A_model_registered_through_one_replica_plans_identically_through_the_others_and_through_nginx()
    {
        await using var set = await ReplicaSet.StartAsync();
        var clients = set.Replicas.Select(r => r.CreateClient()).ToList();
        using var proxy = set.Proxy.CreateClient();
        try
        {
            string id = await clients[0].RegisterAsync(TestModels.DoubleIntegrator);
            string expected = await PlanInputsAsync(clients[0], id);

            // Registration is idempotent by content: the same document through another replica is the same model.
            Assert.Equal(id, await clients[1].RegisterAsync(TestModels.DoubleIntegrator, HttpStatusCode.OK));
            Assert.Equal(expected, await PlanInputsAsync(clients[1], id));
            Assert.Equal(expected, await PlanInputsAsync(clients[2], id));
            for (int i = 0; i < 30; i++)
            {
                Assert.Equal(expected, await PlanInputsAsync(proxy, id));
            }

            // Round robin reached every replica, so each answered some of the plans through nginx.
            var served = set.Proxy.ReadAccessLog().Where(r => r.Request.EndsWith("/plan", StringComparison.Ordinal)).SelectMany(r => r.Upstreams).ToHashSet();
            Assert.Equal(set.Replicas.Select(r => $"127.0.0.1:{r.Address.Port}").Order(), served.Order());
        }
        finally
        {
            clients.ForEach(c => c.Dispose());
        }
    }

    [ReplicaFact]
    public async Task An_alias_change_a_deleted_model_and_a_station_step_are_seen_through_every_replica_within_the_bound()
    {
        await using var set = await ReplicaSet.StartAsync();
        var clients = set.Replicas.Select(r => r.CreateClient()).ToList();
        try
        {
            string first = await clients[0].RegisterAsync(TestModels.DoubleIntegrator);
            string second = await clients[0].RegisterAsync(TestModels.DoubleIntegrator.Replace("\"horizon\": 10", "\"horizon\": 12", StringComparison.Ordinal));
            Assert.True((await clients[0].PutAsync("/v1/aliases/zone", StationRequests.Json(new JsonObject { ["modelId"] = first }))).IsSuccessStatusCode);

            // Every replica resolves the alias once, so each remembers the first model.
            foreach (var client in clients)
            {
                Assert.Equal(first, await AliasModelAsync(client));
            }

            Assert.True((await clients[1].PutAsync("/v1/aliases/zone", StationRequests.Json(new JsonObject { ["modelId"] = second }))).IsSuccessStatusCode);
            foreach (var (client, i) in clients.Select((c, i) => (c, i)))
            {
                var took = await SeenWithinBoundAsync(async () => await AliasModelAsync(client) == second, $"replica {i} planning by the re-pointed alias");
                log.WriteLine($"alias re-pointed through replica 1: replica {i} planned with the new model after {took.TotalMilliseconds:F0} ms");
            }

            // The first model, no longer pointed at, is deleted through the third replica; the others had it compiled.
            var deleted = await clients[2].DeleteAsync($"/v1/models/{first}");
            Assert.True(deleted.IsSuccessStatusCode, $"delete: {(int)deleted.StatusCode} {await deleted.Content.ReadAsStringAsync()}");
            foreach (var (client, i) in clients.Select((c, i) => (c, i)))
            {
                var took = await SeenWithinBoundAsync(async () => (await client.GetAsync($"/v1/models/{first}")).StatusCode == HttpStatusCode.NotFound, $"replica {i} reading the deleted model");
                log.WriteLine($"model deleted through replica 2: replica {i} answered 404 for it after {took.TotalMilliseconds:F0} ms");

            }

            // A station stepped in turn through each replica continues one sequence, whoever answers.
            string stationModel = await clients[0].RegisterAsync(TestModels.TwoZonesWithEstimator);
            await StationRequests.BindAsync(clients[0], "cold-room", stationModel);
            var answers = new List<string>();
            var bodies = new List<JsonObject>();
            for (int sequence = 1; sequence <= 3; sequence++)
            {
                // A step names the sequence the station is at; its answer reports the one it moved to.
                var body = StationRequests.StepBody(sequence - 1, [-19.5 - (0.1 * sequence), -20.2], [60, 60], null);
                var response = await clients[sequence - 1].PostJsonAsync("/v1/stations/cold-room/step", body);
                string text = await response.Content.ReadAsStringAsync();
                Assert.True(response.StatusCode == HttpStatusCode.OK, $"step {sequence} through replica {sequence - 1}: {(int)response.StatusCode} {text}");
                Assert.Equal(sequence, JsonNode.Parse(text)!["sequence"]!.GetValue<long>());
                answers.Add(text);
                bodies.Add(body);
                foreach (var (client, i) in clients.Select((c, i) => (c, i)))
                {
                    long expected = sequence;
                    await SeenWithinBoundAsync(async () => (await (await client.GetAsync("/v1/stations/cold-room")).ReadJsonAsync())["sequence"]!.GetValue<long>() == expected, $"replica {i} reading step {sequence}");
                }
            }

            // The last step repeated through another replica (as nginx's retry would) is answered from the store.
            var repeated = await clients[0].PostJsonAsync("/v1/stations/cold-room/step", bodies[2]);
            Assert.Equal(HttpStatusCode.OK, repeated.StatusCode);
            Assert.Equal(answers[2], await repeated.Content.ReadAsStringAsync());
            Assert.Equal(3, (await (await clients[1].GetAsync("/v1/stations/cold-room")).ReadJsonAsync())["stepCount"]!.GetValue<long>());
        }
        finally
        {
            clients.ForEach(c => c.Dispose());
        }
    }

    [ReplicaFact]
    public async Task A_model_deleted_through_one_replica_is_refused_for_planning_by_the_others_within_the_bound()
    {
        await using var set = await ReplicaSet.StartAsync();
        var clients = set.Replicas.Select(r => r.CreateClient()).ToList();
        try
        {
            string id = await clients[0].RegisterAsync(TestModels.DoubleIntegrator);
            foreach (var client in clients)
            {
                await PlanInputsAsync(client, id);
            }

            var deleted = await clients[2].DeleteAsync($"/v1/models/{id}");
            Assert.True(deleted.IsSuccessStatusCode, $"delete: {(int)deleted.StatusCode} {await deleted.Content.ReadAsStringAsync()}");
            foreach (var (client, i) in clients.Select((c, i) => (c, i)))
            {
                var took = await SeenWithinBoundAsync(async () => (await client.PostJsonAsync($"/v1/models/{id}/plan", PlanBody)).StatusCode == HttpStatusCode.NotFound, $"replica {i} planning with the deleted model");
                log.WriteLine($"model deleted through replica 2: replica {i} refused to plan with it after {took.TotalMilliseconds:F0} ms");
            }
        }
        finally
        {
            clients.ForEach(c => c.Dispose());
        }
    }

    [ReplicaFact]
    public async Task Killing_a_replica_under_a_stream_of_plans_loses_no_request_nginx_retried_elsewhere()
    {
        await using var set = await ReplicaSet.StartAsync();
        using var direct = set.Replicas[0].CreateClient();
        using var proxy = set.Proxy.CreateClient();
        string id = await direct.RegisterAsync(TestModels.DoubleIntegrator);
        string expected = await PlanInputsAsync(direct, id);

        var stream = new PlanStream(proxy, id, expected, total: 300, concurrency: 8);
        var running = stream.RunAsync();
        await stream.WaitForCompletedAsync(100);
        var victim = set.Replicas[1];
        await victim.KillAsync();
        await running;

        var plans = set.Proxy.ReadAccessLog().Where(r => r.Request.EndsWith($"/{id}/plan", StringComparison.Ordinal)).ToList();
        int retried = plans.Count(r => r.Retried);
        log.WriteLine($"{stream.Sent} plans sent through nginx, replica 1 killed after {stream.CompletedAtKill} answers: {stream.Succeeded} answered 200 with the expected inputs, {stream.Failures.Count} failed, {retried} retried on another replica by nginx");
        foreach (var entry in plans.Where(r => r.Retried))
        {
            log.WriteLine($"  retried: {string.Join(" -> ", entry.Upstreams)} ({entry.UpstreamStatuses}) answered {entry.Status}");
        }

        // nginx resends a request only while nothing of its answer has reached the client. A request whose answer the
        // killed replica had already begun (its header passed on, the body cut by the kill) cannot be resent by
        // anyone: that is the one kind of failure allowed, at most one per request in flight, and each is named.
        string victimAddress = $"127.0.0.1:{victim.Address.Port}";
        var byNumber = plans.Where(r => r.Number is not null).ToDictionary(r => r.Number!.Value);
        var cutMidAnswer = stream.FailedNumbers
            .Where(n => byNumber.TryGetValue(n, out var entry) && entry.Upstreams.Count == 1 && entry.Upstreams[0] == victimAddress && entry.UpstreamStatuses == "200")
            .ToList();
        log.WriteLine($"{cutMidAnswer.Count} answer(s) cut by the kill after the killed replica had begun sending them");
        Assert.True(
            stream.Failures.Count == cutMidAnswer.Count,
            string.Join('\n', stream.Failures.Take(10).Concat(stream.FailedNumbers.Select(n => byNumber.TryGetValue(n, out var e) ? $"  log of {n}: {e}" : $"  no log entry for {n}"))));
        Assert.InRange(cutMidAnswer.Count, 0, 8);
        Assert.Equal(300, stream.Succeeded + cutMidAnswer.Count);
        Assert.Equal(300, plans.Count);

        // The killed replica was in the rotation, so some request went to it after the kill and was retried; every
        // retried request was answered by a live replica.
        Assert.True(retried > 0, "no request was retried: the kill happened outside the stream");
        Assert.All(plans.Where(r => r.Retried), r => Assert.Equal(victimAddress, r.Upstreams[0]));
        Assert.All(plans.Where(r => r.Retried), r => Assert.Equal(200, r.Status));
    }

    [ReplicaFact]
    public async Task A_replica_restarted_gracefully_under_a_stream_of_plans_drops_nothing()
    {
        await using var set = await ReplicaSet.StartAsync();
        using var direct = set.Replicas[0].CreateClient();
        using var proxy = set.Proxy.CreateClient();
        string id = await direct.RegisterAsync(TestModels.DoubleIntegrator);
        string expected = await PlanInputsAsync(direct, id);

        // Bounded: the stream stops at this many requests, or earlier once the restart is done and 100 more answered.
        var stream = new PlanStream(proxy, id, expected, total: 20_000, concurrency: 4, pause: TimeSpan.FromMilliseconds(5));
        var running = stream.RunAsync();
        await stream.WaitForCompletedAsync(100);
        var (stopping, starting) = await set.RestartGracefullyAsync(2);
        stream.StopAfter(stream.Completed + 100);
        await running;

        int retried = set.Proxy.ReadAccessLog().Count(r => r.Retried);
        log.WriteLine($"{stream.Sent} plans sent through nginx while replica 2 restarted ({stopping.TotalSeconds:F1} s from SIGTERM to exit, {starting.TotalSeconds:F1} s from start to ready): {stream.Succeeded} answered 200 with the expected inputs, {stream.Failures.Count} failed, {retried} retried on another replica by nginx");
        Assert.True(stream.Failures.Count == 0, string.Join('\n', stream.Failures.Take(10)));
        Assert.Equal(stream.Sent, stream.Succeeded);

        using var restarted = set.Replicas[2].CreateClient();
        Assert.Equal(expected, await PlanInputsAsync(restarted, id));
    }

    private static async Task<string> PlanInputsAsync(HttpClient client, string id)
    {
        var response = await client.PostJsonAsync($"/v1/models/{id}/plan", PlanBody);
        string text = await response.Content.ReadAsStringAsync();
        Assert.True(response.StatusCode == HttpStatusCode.OK, $"plan {id}: {(int)response.StatusCode} {text}");
        return JsonNode.Parse(text)!["inputs"]!.ToJsonString();
    }

    private static async Task<string?> AliasModelAsync(HttpClient client)
    {
        var response = await client.PostJsonAsync("/v1/aliases/zone/plan", PlanBody);
        string text = await response.Content.ReadAsStringAsync();
        Assert.True(response.StatusCode == HttpStatusCode.OK, $"plan by alias: {(int)response.StatusCode} {text}");
        return JsonNode.Parse(text)!["modelId"]!.GetValue<string>();
    }

    /// <summary>Polls until the condition holds and returns how long it took; fails once the bound has passed.</summary>
    private static async Task<TimeSpan> SeenWithinBoundAsync(Func<Task<bool>> seen, string what)
    {
        var watch = Stopwatch.StartNew();
        while (true)
        {
            if (await seen())
            {
                return watch.Elapsed;
            }

            Assert.True(watch.Elapsed < PropagationBound, $"{what}: not seen within {PropagationBound.TotalSeconds} s");
            await Task.Delay(25);
        }
    }
}
