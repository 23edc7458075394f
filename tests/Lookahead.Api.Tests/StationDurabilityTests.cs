using System.Globalization;
using System.Net;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;
using Xunit.Abstractions;

namespace Lookahead.Api.Tests;

/// <summary>
/// Durable before the answer, with the built service as a real process: a station step answered 200 is in the store
/// when the process is SIGKILLed right afterwards, and a new process on the same store carries on from it. Each store
/// runs these on a store of its own (the derived classes below).
/// </summary>
public abstract class StationDurabilityTests(ITestOutputHelper log)
{
    private static readonly TimeSpan LoopTimeout = TimeSpan.FromSeconds(30);

    private volatile bool killing;

    protected abstract ServiceStore CreateStore();

    [StoreFact]
    public async Task A_step_answered_right_before_sigkill_is_kept_bit_for_bit_retried_from_store_and_stepped_on_from()
    {
        await using var store = CreateStore();
        var zone = new StationLoop("zone-a");
        string id;
        JsonNode last;
        using (var first = await ServiceProcess.StartAsync(store))
        {
            using var client = first.CreateClient();
            id = await client.RegisterAsync(TestModels.TwoZonesWithEstimator);
            await PutStationAsync(client, zone.Name, id);
            do
            {
                last = await zone.StepAsync(client);
            }
            while (zone.Acknowledged < 5);

            // No graceful shutdown: the process dies as soon as the last answer has been read.
            await first.KillAsync();
        }

        using var second = await ServiceProcess.StartAsync(store);
        using var again = second.CreateClient();
        var station = await GetStationAsync(again, zone.Name);
        AssertHolds(station, last, zone.LastApplied!, zone.Name);

        // The identical retry of the last acknowledged step (its old sequence, the same body) is answered from the
        // store, to the byte, and does not step again.
        var retry = await again.PostJsonAsync($"/v1/stations/{zone.Name}/step", zone.LastBody!);
        Assert.Equal(HttpStatusCode.OK, retry.StatusCode);
        Assert.Equal(zone.LastAnswer, await retry.Content.ReadAsStringAsync());
        var afterRetry = await GetStationAsync(again, zone.Name);
        Assert.Equal(5, afterRetry["sequence"]!.GetValue<long>());
        Assert.Equal(5, afterRetry["stepCount"]!.GetValue<long>());

        // The next step leaves the applied input out, so it runs on the restored move as well as the restored
        // estimate: it must equal the stateless /estimate from the state answered before the kill.
        var next = await zone.StepAsync(again);
        Assert.Null(zone.LastBody!["appliedInput"]);
        Assert.Equal(6, next["sequence"]!.GetValue<long>());
        var byHand = await (await again.PostJsonAsync($"/v1/models/{id}/estimate", new JsonObject
        {
            ["estimate"] = last["estimate"]!.DeepClone(),
            ["appliedInput"] = last["firstMove"]!.DeepClone(),
            ["measurement"] = zone.LastBody["measurement"]!.DeepClone(),
        })).ReadJsonAsync();
        AssertSameBits(byHand["estimate"]!["state"]!, next["estimate"]!["state"]!, "the step after the restart: estimate.state");
        AssertSameBits(byHand["estimate"]!["disturbance"]!, next["estimate"]!["disturbance"]!, "the step after the restart: estimate.disturbance");
    }

    /// <remarks>
    /// Three stations step in a loop while a fourth is stepped once more and the process is killed right after that
    /// answer, so steps of the three are in flight at the kill. For each of them, with A the sequence of its last answer
    /// read in full: the stored sequence is A (the step in flight did not commit) or A + 1 (it committed but its answer
    /// was lost); nothing else. At A the state equals the last answer bit for bit and the identical retry of that step
    /// gets the same answer text; at A + 1 the retry of the step in flight gets the stored answer, which holds the stored
    /// state. Either way, resending the step in flight, as a client whose answer was lost does, leaves the station at
    /// A + 1 with A + 1 steps: it landed exactly once.
    /// </remarks>
    [StoreFact]
    public async Task A_sigkill_with_steps_in_flight_keeps_every_acknowledged_step_and_a_lost_answer_lands_once()
    {
        await using var store = CreateStore();
        var steady = new StationLoop("steady");
        var busy = Enumerable.Range(1, 3).Select(i => new StationLoop($"busy-{i}")).ToList();
        JsonNode steadyLast;
        using (var first = await ServiceProcess.StartAsync(store))
        {
            using var client = first.CreateClient();
            string id = await client.RegisterAsync(TestModels.TwoZonesWithEstimator);
            foreach (var loop in busy.Prepend(steady))
            {
                await PutStationAsync(client, loop.Name, id);
            }

            await steady.StepAsync(client);
            var clients = busy.Select(_ => first.CreateClient()).ToList();
            var running = busy.Select((loop, i) => Task.Run(() => loop.RunUntilKilledAsync(clients[i], () => killing))).ToList();
            try
            {
                var deadline = DateTime.UtcNow + LoopTimeout;
                while (busy.Any(loop => loop.Acknowledged < 3))
                {
                    if (running.FirstOrDefault(t => t.IsCompleted) is { } ended)
                    {
                        await ended;
                        Assert.Fail("a busy station stopped stepping before the kill");
                    }

                    Assert.True(DateTime.UtcNow < deadline, $"the busy stations did not answer three steps each within {LoopTimeout.TotalSeconds} s");
                    await Task.Delay(10);
                }

                steadyLast = await steady.StepAsync(client);
                killing = true;
                await first.KillAsync();
                await Task.WhenAll(running).WaitAsync(LoopTimeout);
            }
            finally
            {
                killing = true;
                clients.ForEach(c => c.Dispose());
            }
        }

        using var second = await ServiceProcess.StartAsync(store);
        using var again = second.CreateClient();
        AssertHolds(await GetStationAsync(again, steady.Name), steadyLast, steady.LastApplied!, steady.Name);

        foreach (var loop in busy)
        {
            long acknowledged = loop.Acknowledged;
            var stored = await GetStationAsync(again, loop.Name);
            long sequence = stored["sequence"]!.GetValue<long>();
            log.WriteLine($"{loop.Name}: {acknowledged} steps answered before the kill, {sequence} stored");
            Assert.True(
                sequence == acknowledged || sequence == acknowledged + 1,
                $"{loop.Name}: {acknowledged} steps were answered before the kill but the store holds sequence {sequence}");
            Assert.NotNull(loop.InFlight);

            if (sequence == acknowledged)
            {
                AssertHolds(stored, JsonNode.Parse(loop.LastAnswer!)!, loop.LastApplied!, loop.Name);
                var retry = await again.PostJsonAsync($"/v1/stations/{loop.Name}/step", loop.LastBody!);
                Assert.Equal(HttpStatusCode.OK, retry.StatusCode);
                Assert.Equal(loop.LastAnswer, await retry.Content.ReadAsStringAsync());
            }

            var resent = await again.PostJsonAsync($"/v1/stations/{loop.Name}/step", loop.InFlight!);
            string text = await resent.Content.ReadAsStringAsync();
            Assert.True(resent.StatusCode == HttpStatusCode.OK, $"{loop.Name}: resending the step in flight: {(int)resent.StatusCode} {text}");
            if (sequence == acknowledged + 1)
            {
                AssertHolds(stored, JsonNode.Parse(text)!, loop.InFlightApplied, loop.Name);
            }

            var after = await GetStationAsync(again, loop.Name);
            Assert.Equal(acknowledged + 1, after["sequence"]!.GetValue<long>());
            Assert.Equal(acknowledged + 1, after["stepCount"]!.GetValue<long>());
        }
    }

    private static async Task PutStationAsync(HttpClient client, string name, string modelId)
    {
        var response = await client.PutAsync($"/v1/stations/{name}", new StringContent(new JsonObject { ["model"] = modelId }.ToJsonString(), System.Text.Encoding.UTF8, "application/json"));
        Assert.True(response.StatusCode == HttpStatusCode.Created, $"PUT station {name}: {(int)response.StatusCode} {await response.Content.ReadAsStringAsync()}");
    }

    private static async Task<JsonNode> GetStationAsync(HttpClient client, string name)
    {
        var response = await client.GetAsync($"/v1/stations/{name}");
        string text = await response.Content.ReadAsStringAsync();
        Assert.True(response.StatusCode == HttpStatusCode.OK, $"GET station {name}: {(int)response.StatusCode} {text}");
        return JsonNode.Parse(text)!;
    }

    /// <summary>The station as read holds what the answer reported: its sequence and step count, and bit for bit its estimate, the input taken as applied and the suggested move.</summary>
    private static void AssertHolds(JsonNode station, JsonNode answer, double[] applied, string name)
    {
        long sequence = answer["sequence"]!.GetValue<long>();
        long stored = station["sequence"]!.GetValue<long>();
        Assert.True(sequence == stored, $"{name}: the answer reported sequence {sequence}, the store holds {stored}");

        // Never re-bound, so every step the station took moved its sequence by one.
        long steps = station["stepCount"]!.GetValue<long>();
        Assert.True(sequence == steps, $"{name}: the answer reported sequence {sequence}, the store counts {steps} steps");
        AssertSameBits(answer["estimate"]!["state"]!, station["estimate"]!["state"]!, $"{name} estimate.state");
        AssertSameBits(answer["estimate"]!["disturbance"]!, station["estimate"]!["disturbance"]!, $"{name} estimate.disturbance");
        AssertSameBits(answer["firstMove"]!, station["lastSuggestedMove"]!, $"{name} lastSuggestedMove");
        AssertSameBits(new JsonArray(applied.Select(v => (JsonNode)v).ToArray()), station["lastAppliedInput"]!, $"{name} lastAppliedInput");
    }

    /// <summary>Equal as doubles to the bit: a restored estimate that differs in the last place is a different estimate.</summary>
    private static void AssertSameBits(JsonNode expected, JsonNode actual, string what)
    {
        double[] e = expected.Doubles();
        double[] a = actual.Doubles();
        bool same = e.Length == a.Length && e.Zip(a).All(p => BitConverter.DoubleToInt64Bits(p.First) == BitConverter.DoubleToInt64Bits(p.Second));
        Assert.True(same, $"{what}: [{Text(e)}] answered before the kill, [{Text(a)}] read after it");
    }

    private static string Text(double[] values) => string.Join(", ", values.Select(v => v.ToString("R", CultureInfo.InvariantCulture)));

    /// <summary>A client stepping one station, remembering the last step answered in full and the one it has in flight.</summary>
    private sealed class StationLoop(string name)
    {
        private long acknowledged;
        private double[]? lastMove;

        public string Name => name;

        /// <summary>The station's sequence as the last answer read in full reported it (the count of answered steps).</summary>
        public long Acknowledged => Interlocked.Read(ref acknowledged);

        public JsonObject? LastBody { get; private set; }

        public string? LastAnswer { get; private set; }

        /// <summary>The step sent whose answer has not been read (null between steps).</summary>
        public JsonObject? InFlight { get; private set; }

        /// <summary>What the station took as applied at the last answered step: the body's applied input, or when left out the move suggested before.</summary>
        public double[]? LastApplied { get; private set; }

        /// <summary>What the station takes as applied for the step in flight.</summary>
        public double[] InFlightApplied => AppliedBy(InFlight!);

        public async Task<JsonNode> StepAsync(HttpClient client)
        {
            long sequence = Acknowledged;
            var body = Sample(sequence);
            InFlight = body;
            var response = await client.PostJsonAsync($"/v1/stations/{name}/step", body);
            string text = await response.Content.ReadAsStringAsync();
            Assert.True(response.StatusCode == HttpStatusCode.OK, $"{name} step {sequence}: {(int)response.StatusCode} {text}");
            var answer = JsonNode.Parse(text)!;
            Assert.Equal(sequence + 1, answer["sequence"]!.GetValue<long>());
            LastBody = body;
            LastAnswer = text;
            LastApplied = AppliedBy(body);
            lastMove = answer["firstMove"]!.Doubles();
            InFlight = null;
            Interlocked.Increment(ref acknowledged);
            return answer;
        }

        /// <summary>Steps until a request fails because the process is being killed; any other failure fails the test.</summary>
        public async Task RunUntilKilledAsync(HttpClient client, Func<bool> killed)
        {
            while (true)
            {
                try
                {
                    await StepAsync(client);
                }
                catch (HttpRequestException) when (killed())
                {
                    return;
                }
            }
        }

        private double[] AppliedBy(JsonObject body) => body["appliedInput"]?.Doubles() ?? lastMove!;

        /// <summary>
        /// The sample at a sequence: a drifting reading of both zones, the setpoint, and an applied input near the
        /// operating point, left out every third step so the station assumes its own last move.
        /// </summary>
        private static JsonObject Sample(long sequence)
        {
            var body = new JsonObject
            {
                ["sequence"] = sequence,
                ["measurement"] = new JsonArray(-20.5 + (0.1 * Math.Sin(sequence)), -19.8 + (0.1 * Math.Cos(sequence))),
                ["reference"] = new JsonArray(-21.0, -19.5),
            };
            if (sequence % 3 != 2)
            {
                body["appliedInput"] = new JsonArray(60.0 + (sequence % 4), 60.0 - (sequence % 3));
            }

            return body;
        }
    }
}

/// <summary>The station durability tests on a SQLite file of their own.</summary>
public sealed class SqliteStationDurabilityTests(ITestOutputHelper log) : StationDurabilityTests(log)
{
    protected override ServiceStore CreateStore() => ServiceStore.Sqlite();
}

/// <summary>The station durability tests on a PostgreSQL schema of their own (tests/run.sh starts a server).</summary>
[RequiresEnvironmentVariable(ServiceStore.PostgresVariable, "the PostgreSQL station durability tests need a server; tests/run.sh starts one and sets this Npgsql connection string")]
public sealed class PostgresStationDurabilityTests(ITestOutputHelper log) : StationDurabilityTests(log)
{
    protected override ServiceStore CreateStore() => ServiceStore.Postgres();
}
