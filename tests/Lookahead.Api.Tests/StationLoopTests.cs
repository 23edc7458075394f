using System.Collections.Concurrent;
using System.Net;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Microsoft.AspNetCore.TestHost;
using Microsoft.Extensions.DependencyInjection;
using Serilog.Core;
using Serilog.Events;
using Xunit;
using static Lookahead.Api.Tests.Support.Stations;

namespace Lookahead.Api.Tests;

/// <summary>
/// What a station does across its loop's life: bridging missed samples by the plant's timestamps, following a
/// re-pointed alias, answering with the whole plan, schedules and forecasts, keeping its last steps (JSON and CSV),
/// and counting and logging what it does. Every estimate and plan is checked against the stateless /estimate and
/// /plan chained by hand with the same values.
/// </summary>
public class StationLoopTests
{
    /// <summary>Two zones in engineering units with a measured outdoor temperature and an output-disturbance estimator (invented numbers).</summary>
    private const string Model = """
        {
          "plant": { "a": [[0.9, 0.05], [0.04, 0.85]], "b": [[0.1, 0.0], [0.02, 0.08]], "c": [[1, 0], [0, 1]], "e": [[0.01], [0.02]],
                     "sampleTime": 60, "timeDomain": "discrete" },
          "cost": { "horizon": 15, "outputWeight": [1.0, 1.0], "inputWeight": [0.05, 0.05], "inputRateWeight": [0.1, 0.1] },
          "limits": { "inputMin": [0, 0], "inputMax": [100, 100], "inputRateMin": [-5, -5], "inputRateMax": [5, 5] },
          "operatingPoint": { "state": [-20, -20], "input": [60, 60], "output": [-20, -20], "disturbance": [15] },
          "labels": { "states": ["zone_a", "zone_b"], "inputs": ["fan_a", "fan_b"], "outputs": ["zone_a", "zone_b"] },
          "estimator": { "processNoise": [1e-4, 1e-4, 1e-2, 1e-2], "measurementNoise": [1e-3, 1e-3] }
        }
        """;

    private static readonly DateTimeOffset T0 = new(2026, 12, 2, 6, 0, 0, TimeSpan.Zero);

    [Fact]
    public async Task Missed_samples_are_bridged_with_the_applied_input_held_as_the_stateless_chain_would()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        await BindAsync(client, "gap", id);

        var first = await StepAsync(client, "gap", Timed(StepBody(0, [-20.5, -19.8], [60, 60], null), T0));
        var second = await StepAsync(client, "gap", Timed(StepBody(1, [-20.4, -19.9], [61, 59], null), T0.AddSeconds(80)));
        Assert.Equal(0, second["missedSamples"]!.GetValue<int>());
        Assert.DoesNotContain("samples-missed", Codes(second));

        // 3.08 sample times later: two samples were missed; the plant held [62, 58] through them.
        var late = await StepAsync(client, "gap", Timed(StepBody(2, [-20.1, -20.2], [62, 58], null), T0.AddSeconds(80 + 185)));
        Assert.Equal(2, late["missedSamples"]!.GetValue<int>());
        var warning = late["warnings"]!.AsArray().Single(w => w!["code"]!.GetValue<string>() == "samples-missed")!;
        Assert.Equal(2, warning["count"]!.GetValue<int>());

        JsonNode estimate = second["estimate"]!;
        foreach (var measurement in new double[]?[] { null, null, [-20.1, -20.2] })
        {
            estimate = (await (await client.PostJsonAsync($"/v1/models/{id}/estimate", EstimateBody(estimate, [62, 58], measurement))).ReadJsonAsync())["estimate"]!;
        }

        Assert.Equal(estimate["state"]!.Doubles(), late["estimate"]!["state"]!.Doubles());
        Assert.Equal(estimate["disturbance"]!.Doubles(), late["estimate"]!["disturbance"]!.Doubles());
        Assert.NotNull(first["firstMove"]);
    }

    [Fact]
    public async Task A_gap_beyond_the_configured_bound_starts_the_estimate_over_and_time_must_go_forward()
    {
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Stations:MaxMissedSamples"] = "5" });
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        await BindAsync(client, "restart", id);
        await StepAsync(client, "restart", Timed(StepBody(0, [-20.5, -19.8], [60, 60], null), T0));

        var backwards = await client.PostJsonAsync("/v1/stations/restart/step", Timed(StepBody(1, [-20.4, -19.9], [61, 59], null), T0.AddSeconds(-1)));
        Assert.Contains(await backwards.ReadProblemAsync(HttpStatusCode.BadRequest), e => e.Path == "timestamp");

        // Ten sample times: nine missed, more than five.
        var after = await StepAsync(client, "restart", Timed(StepBody(1, [-21.0, -19.0], [61, 59], null), T0.AddMinutes(10)));
        Assert.Contains("station-restarted-after-gap", Codes(after));
        Assert.Contains("estimate-initialised", Codes(after));
        Assert.Equal(0, after["missedSamples"]!.GetValue<int>());
        var fresh = await (await client.PostJsonAsync($"/v1/models/{id}/estimate", EstimateBody(null, [61, 59], [-21.0, -19.0]))).ReadJsonAsync();
        Assert.Equal(fresh["estimate"]!["state"]!.Doubles(), after["estimate"]!["state"]!.Doubles());
        Assert.Equal(1, await Metrics.ReadAsync(client, "lookahead_station_restarts_total{reason=\"gap\"}"));

        // Without a timestamp no gap can be told, and the next timestamped step starts a new chain.
        var untimed = await StepAsync(client, "restart", StepBody(2, [-20.9, -19.1], [62, 58], null));
        Assert.Equal(0, untimed["missedSamples"]!.GetValue<int>());
        var station = await (await client.GetAsync("/v1/stations/restart")).ReadJsonAsync();
        Assert.Null(station["lastTimestamp"]);
    }

    [Fact]
    public async Task A_station_follows_its_alias_keeping_the_estimate_when_dimensions_match_and_starting_over_when_not()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string first = await client.RegisterAsync(Model);
        string retuned = await client.RegisterAsync(Model.Replace("\"inputRateWeight\": [0.1, 0.1]", "\"inputRateWeight\": [0.4, 0.4]", StringComparison.Ordinal));
        string oneZone = await client.RegisterAsync("""
            {
              "plant": { "a": [[0.9]], "b": [[0.1, 0.05]], "c": [[1]], "sampleTime": 60, "timeDomain": "discrete" },
              "cost": { "horizon": 10, "outputWeight": [1.0], "inputWeight": [0.05, 0.05] },
              "operatingPoint": { "state": [-20], "input": [60, 60], "output": [-20] },
              "estimator": { "processNoise": [1e-4, 1e-2], "measurementNoise": [1e-3] }
            }
            """);
        await SetAliasAsync(client, "zones", first);
        await BindAsync(client, "follower", "zones");
        var before = await StepAsync(client, "follower", 0, [-20.5, -19.8], [60, 60]);
        Assert.Equal(first, before["modelId"]!.GetValue<string>());

        await SetAliasAsync(client, "zones", retuned);
        var kept = await StepAsync(client, "follower", 1, [-20.4, -19.9], [61, 59]);
        Assert.Equal(retuned, kept["modelId"]!.GetValue<string>());
        Assert.Contains("model-changed-estimate-kept", Codes(kept));
        var byHand = await (await client.PostJsonAsync($"/v1/models/{retuned}/estimate", EstimateBody(before["estimate"], [61, 59], [-20.4, -19.9]))).ReadJsonAsync();
        Assert.Equal(byHand["estimate"]!["state"]!.Doubles(), kept["estimate"]!["state"]!.Doubles());
        Assert.Equal(retuned, (await (await client.GetAsync("/v1/stations/follower")).ReadJsonAsync())["modelId"]!.GetValue<string>());

        await SetAliasAsync(client, "zones", oneZone);
        var restarted = await StepAsync(client, "follower", 2, [-20.3], [62, 58]);
        Assert.Equal(oneZone, restarted["modelId"]!.GetValue<string>());
        Assert.Contains("model-changed-estimate-restarted", Codes(restarted));
        Assert.Contains("estimate-initialised", Codes(restarted));
        Assert.Single(restarted["estimate"]!["state"]!.AsArray());
        Assert.Equal(1, await Metrics.ReadAsync(client, "lookahead_station_restarts_total{reason=\"model\"}"));

        // The alias removed: the loop keeps the tuning it last had.
        Assert.Equal(HttpStatusCode.NoContent, (await client.DeleteAsync("/v1/aliases/zones")).StatusCode);
        var orphan = await StepAsync(client, "follower", 3, [-20.2], [62, 58]);
        Assert.Equal(oneZone, orphan["modelId"]!.GetValue<string>());
        Assert.Contains("alias-gone-model-kept", Codes(orphan));
    }

    [Fact]
    public async Task A_full_station_answers_with_the_plan_for_schedules_and_forecasts_as_plan_would()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        var badDetail = await client.PutAsync("/v1/stations/display", Json("""{"model":"x","detail":"everything"}"""));
        Assert.Contains(await badDetail.ReadProblemAsync(HttpStatusCode.BadRequest), e => e.Path == "detail");
        await BindAsync(client, "display", id, detail: "full");

        double[][] schedule = [[-20, -20], [-20, -20], [-21, -19.5]];
        double[][] forecast = [[14], [16], [18], [20]];
        var body = StepBody(0, [-20.5, -19.8], [60, 60], null);
        body["reference"] = Rows(schedule);
        body["disturbance"] = Rows(forecast);
        var step = await StepAsync(client, "display", body);

        var estimated = await (await client.PostJsonAsync($"/v1/models/{id}/estimate", new JsonObject
        {
            ["appliedInput"] = Array([60, 60]), ["measurement"] = Array([-20.5, -19.8]), ["measuredDisturbance"] = Array([14]),
        })).ReadJsonAsync();
        Assert.Equal(estimated["estimate"]!["state"]!.Doubles(), step["estimate"]!["state"]!.Doubles());
        var plan = await (await client.PostJsonAsync($"/v1/models/{id}/plan", new JsonObject
        {
            ["estimate"] = estimated["estimate"]!.DeepClone(), ["previousInput"] = Array([60, 60]), ["reference"] = Rows(schedule), ["disturbance"] = Rows(forecast),
        })).ReadJsonAsync();

        var full = step["plan"]!;
        Assert.Equal(plan["status"]!.GetValue<string>(), full["status"]!.GetValue<string>());
        Assert.Equal(plan["inputs"]!.AsArray().Count, full["inputs"]!.AsArray().Count);
        for (int k = 0; k < plan["inputs"]!.AsArray().Count; k++)
        {
            var expected = plan["inputs"]![k]!.Doubles();
            var got = full["inputs"]![k]!.Doubles();
            for (int i = 0; i < expected.Length; i++)
            {
                Assert.True(Math.Abs(expected[i] - got[i]) <= 1e-12 * Math.Max(1, Math.Abs(expected[i])), $"step {k} input {i}: {got[i]} vs {expected[i]}");
            }
        }

        Assert.Equal(plan["cost"]!.GetValue<double>(), full["cost"]!.GetValue<double>(), 1e-9);
        var firstMove = step["firstMove"]!.Doubles();
        Assert.All(full["inputs"]![0]!.Doubles().Zip(firstMove), p => Assert.Equal(p.First, p.Second, 1e-12));

        // A schedule longer than the horizon is refused by path.
        var tooLong = StepBody(1, [-20.4, -19.9], [61, 59], null);
        tooLong["reference"] = Rows(Enumerable.Repeat(new double[] { -20, -20 }, 16).ToArray());
        Assert.Contains(await (await client.PostJsonAsync("/v1/stations/display/step", tooLong)).ReadProblemAsync(HttpStatusCode.BadRequest), e => e.Path == "reference");
    }

    [Fact]
    public async Task The_last_steps_are_kept_as_asked_and_answered_in_json_and_csv()
    {
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Stations:HistoryLength"] = "3" });
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        await BindAsync(client, "kept", id);
        var answers = new List<JsonNode>();
        for (int k = 0; k < 5; k++)
        {
            var body = StepBody(k, k == 3 ? null : [-20.5 + (0.1 * k), -19.8], k == 4 ? null : [60 + k, 60 - k], [-21, -19.5]);
            answers.Add(await StepAsync(client, "kept", Timed(body, T0.AddMinutes(k))));
        }

        var history = await (await client.GetAsync("/v1/stations/kept/steps")).ReadJsonAsync();
        var steps = history["steps"]!.AsArray();
        Assert.Equal([2L, 3L, 4L], steps.Select(s => s!["sequence"]!.GetValue<long>()));
        for (int i = 0; i < 3; i++)
        {
            Assert.Equal(answers[i + 2].ToJsonString(), steps[i]!["answer"]!.ToJsonString());
        }

        Assert.Null(steps[1]!["request"]!["measurement"]);
        Assert.Equal([4L, 5L], (await (await client.GetAsync("/v1/stations/kept/steps?limit=2")).ReadJsonAsync())["steps"]!.AsArray().Select(s => s!["answer"]!["sequence"]!.GetValue<long>()));
        Assert.Contains(await (await client.GetAsync("/v1/stations/kept/steps?limit=4")).ReadProblemAsync(HttpStatusCode.BadRequest), e => e.Path == "limit");
        Assert.Contains(await (await client.GetAsync("/v1/stations/kept/steps?format=xml")).ReadProblemAsync(HttpStatusCode.BadRequest), e => e.Path == "format");
        await (await client.GetAsync("/v1/stations/nobody/steps")).ReadProblemAsync(HttpStatusCode.NotFound);

        var csv = await client.GetAsync("/v1/stations/kept/steps?format=csv");
        Assert.Equal("text/csv", csv.Content.Headers.ContentType?.MediaType);
        var lines = (await csv.Content.ReadAsStringAsync()).TrimEnd('\n').Split('\n');
        var header = lines[0].Split(',');
        Assert.Equal(
            ["sequence", "stepped_at", "timestamp", "mode", "model_id", "y_zone_a", "y_zone_b", "applied_fan_a", "applied_fan_b", "fan_a", "fan_b",
             "xhat_zone_a", "xhat_zone_b", "dhat1", "dhat2", "missed_samples", "status", "message"],
            header);
        Assert.Equal(4, lines.Length);
        for (int i = 0; i < 3; i++)
        {
            var cells = Cells(lines[i + 1], header);
            var answer = answers[i + 2];
            Assert.Equal((i + 2).ToString(System.Globalization.CultureInfo.InvariantCulture), cells["sequence"]);
            Assert.Equal(answer["appliedInput"]!.Doubles(), new[] { Number(cells["applied_fan_a"]), Number(cells["applied_fan_b"]) });
            Assert.Equal(answer["firstMove"]!.Doubles(), new[] { Number(cells["fan_a"]), Number(cells["fan_b"]) });
            Assert.Equal(answer["estimate"]!["state"]!.Doubles(), new[] { Number(cells["xhat_zone_a"]), Number(cells["xhat_zone_b"]) });
            Assert.Equal(T0.AddMinutes(i + 2), DateTimeOffset.Parse(cells["timestamp"], System.Globalization.CultureInfo.InvariantCulture));
        }

        // The step without a reading has empty measurement cells and says why in its message.
        var missing = Cells(lines[2], header);
        Assert.Equal("", missing["y_zone_a"]);
        Assert.Contains("measurement-missing", missing["message"], StringComparison.Ordinal);
        Assert.Contains("applied-input-assumed", Cells(lines[3], header)["message"], StringComparison.Ordinal);

        // A station started over has no history.
        await BindAsync(client, "kept", id);
        Assert.Empty((await (await client.GetAsync("/v1/stations/kept/steps")).ReadJsonAsync())["steps"]!.AsArray());
    }

    [Fact]
    public async Task Steps_conflicts_and_retries_are_counted_and_logged_with_the_station_name()
    {
        var events = new ConcurrentQueue<LogEvent>();
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Serilog:MinimumLevel:Override:Lookahead.Api.Stations"] = "Debug" });
        var client = factory.WithWebHostBuilder(b => b.ConfigureTestServices(s => s.AddSingleton<ILogEventSink>(new CapturingSink(events)))).CreateClient();
        string id = await client.RegisterAsync(Model);
        await BindAsync(client, "counted", id);
        double steps = await Metrics.ReadAsync(client, "lookahead_station_steps_total{mode=\"auto\",status=\"optimal\"}");

        var body = StepBody(0, [-20.5, -19.8], [60, 60], null);
        await StepAsync(client, "counted", body);
        await StepAsync(client, "counted", body);
        await (await client.PostJsonAsync("/v1/stations/counted/step", StepBody(0, [-20.0, -19.8], [60, 60], null))).ReadProblemAsync(HttpStatusCode.Conflict);
        var track = StepBody(1, [-20.4, -19.9], [61, 59], null);
        track["mode"] = "track";
        await StepAsync(client, "counted", track);

        Assert.Equal(steps + 1, await Metrics.ReadAsync(client, "lookahead_station_steps_total{mode=\"auto\",status=\"optimal\"}"));
        Assert.Equal(1, await Metrics.ReadAsync(client, "lookahead_station_steps_total{mode=\"track\",status=\"tracking\"}"));
        Assert.Equal(1, await Metrics.ReadAsync(client, "lookahead_station_retries_total"));
        Assert.Equal(1, await Metrics.ReadAsync(client, "lookahead_station_conflicts_total"));
        Assert.Equal(2, await Metrics.ReadAsync(client, "lookahead_station_step_duration_seconds_count"));
        Assert.Equal(1, await Metrics.ReadAsync(client, "lookahead_plans_total{endpoint=\"station\",status=\"optimal\"}"));

        var named = events.Where(e => e.Properties.TryGetValue("Station", out var v) && v.ToString() == "\"counted\"").Select(e => e.MessageTemplate.Text).ToList();
        Assert.Equal(2, named.Count(t => t.Contains("stepped to sequence", StringComparison.Ordinal)));
        Assert.Single(named, t => t.Contains("refused a step", StringComparison.Ordinal));
    }

    private static JsonObject Timed(JsonObject body, DateTimeOffset at)
    {
        body["timestamp"] = at.ToString("O", System.Globalization.CultureInfo.InvariantCulture);
        return body;
    }

    private static async Task SetAliasAsync(HttpClient client, string alias, string id)
    {
        var response = await client.PutAsync($"/v1/aliases/{alias}", Json(new JsonObject { ["modelId"] = id }));
        Assert.True(response.IsSuccessStatusCode, await response.Content.ReadAsStringAsync());
    }

    private static Dictionary<string, string> Cells(string line, string[] header)
    {
        // The message column may hold commas inside quotes; every column before it is a plain value.
        var parts = line.Split(',', header.Length);
        return header.Select((h, i) => (h, parts[i])).ToDictionary(p => p.h, p => p.Item2);
    }

    private static double Number(string cell) => double.Parse(cell, System.Globalization.CultureInfo.InvariantCulture);

    private sealed class CapturingSink(ConcurrentQueue<LogEvent> events) : ILogEventSink
    {
        public void Emit(LogEvent logEvent) => events.Enqueue(logEvent);
    }
}
