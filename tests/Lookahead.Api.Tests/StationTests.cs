using System.Net;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using static Lookahead.Api.Tests.Support.Stations;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// Stations over HTTP: binding, reading, listing and deleting; steps that must equal the stateless /estimate and
/// /plan chained by hand with the same values; the sequence rule (stale → 409, identical retry → stored answer,
/// concurrent steps applied once); track mode; state kept across a restart; bad input named by path.
/// </summary>
public class StationTests
{
    private const string Model = TestModels.TwoZonesWithEstimator;

    private static readonly double[] Reference = [-21.0, -19.5];

    [Fact]
    public async Task A_station_is_created_replaced_read_listed_and_deleted()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        Assert.Equal(HttpStatusCode.Created, (await client.PutAsync($"/v1/aliases/zones", Json(new JsonObject { ["modelId"] = id }))).StatusCode);

        var created = await client.PutAsync("/v1/stations/zone-b", Json(new JsonObject { ["model"] = "zones" }));
        Assert.Equal(HttpStatusCode.Created, created.StatusCode);
        Assert.Equal("/v1/stations/zone-b", created.Headers.Location?.OriginalString);
        Assert.Equal(HttpStatusCode.Created, (await client.PutAsync("/v1/stations/zone-a", Json(new JsonObject { ["model"] = id }))).StatusCode);
        await StepAsync(client, "zone-b", 0, [-20.5, -19.8], [60, 60]);

        var read = await (await client.GetAsync("/v1/stations/zone-b")).ReadJsonAsync();
        Assert.Equal("zones", read["model"]!.GetValue<string>());
        Assert.Equal(id, read["modelId"]!.GetValue<string>());
        Assert.Equal(1, read["sequence"]!.GetValue<long>());
        Assert.Equal(1, read["stepCount"]!.GetValue<long>());
        Assert.Equal([60.0, 60.0], read["lastAppliedInput"]!.Doubles());
        Assert.Equal(2, read["lastSuggestedMove"]!.AsArray().Count);
        Assert.Equal(2, read["estimate"]!["disturbance"]!.AsArray().Count);

        // Replacing starts the station over.
        Assert.Equal(HttpStatusCode.OK, (await client.PutAsync("/v1/stations/zone-b", Json(new JsonObject { ["model"] = id }))).StatusCode);
        var fresh = await (await client.GetAsync("/v1/stations/zone-b")).ReadJsonAsync();
        Assert.Equal(0, fresh["sequence"]!.GetValue<long>());
        Assert.Null(fresh["estimate"]);

        var page = await (await client.GetAsync("/v1/stations?limit=1")).ReadJsonAsync();
        Assert.Equal(2, page["total"]!.GetValue<long>());
        Assert.Equal("zone-a", page["items"]![0]!["name"]!.GetValue<string>());
        var second = await (await client.GetAsync("/v1/stations?offset=1&limit=1")).ReadJsonAsync();
        Assert.Equal("zone-b", second["items"]![0]!["name"]!.GetValue<string>());

        Assert.Equal(HttpStatusCode.NoContent, (await client.DeleteAsync("/v1/stations/zone-b")).StatusCode);
        await (await client.DeleteAsync("/v1/stations/zone-b")).ReadProblemAsync(HttpStatusCode.NotFound);
        await (await client.GetAsync("/v1/stations/zone-b")).ReadProblemAsync(HttpStatusCode.NotFound);
    }

    [Fact]
    public async Task Twenty_steps_equal_the_stateless_estimate_and_plan_chained_by_hand()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        await client.PutAsync("/v1/stations/loop", Json(new JsonObject { ["model"] = id }));

        var plant = new TruePlant();
        JsonNode? estimate = null;
        double[] applied = [62, 58];
        double[]? lastMove = null;
        for (int k = 0; k < 20; k++)
        {
            var y = plant.Measure();

            // Every fourth step leaves the applied input out: the station must assume its own last move.
            bool omit = k % 4 == 3;
            var step = await StepAsync(client, "loop", k, y, omit ? null : applied, Reference);
            if (omit)
            {
                Assert.Contains(Codes(step), c => c == "applied-input-assumed");
                applied = lastMove!;
            }

            var byHand = await (await client.PostJsonAsync($"/v1/models/{id}/estimate", EstimateBody(estimate, applied, y))).ReadJsonAsync();
            estimate = byHand["estimate"]!;
            var plan = await (await client.PostJsonAsync($"/v1/models/{id}/plan", new JsonObject
            {
                ["estimate"] = estimate.DeepClone(),
                ["previousInput"] = Array(applied),
                ["reference"] = Array(Reference),
            })).ReadJsonAsync();

            Assert.Equal(k + 1, step["sequence"]!.GetValue<long>());

            // Estimates travel as round-trip doubles both ways, so the station's chain must match bit for bit.
            Assert.Equal(estimate["state"]!.Doubles(), step["estimate"]!["state"]!.Doubles());
            Assert.Equal(estimate["disturbance"]!.Doubles(), step["estimate"]!["disturbance"]!.Doubles());
            Assert.Equal(plan["status"]!.GetValue<string>(), step["status"]!.GetValue<string>());

            // /plan writes trajectories with 15 significant digits (README); the move is compared to that rounding.
            var move = step["firstMove"]!.Doubles();
            var expected = plan["inputs"]![0]!.Doubles();
            for (int i = 0; i < move.Length; i++)
            {
                Assert.True(Math.Abs(move[i] - expected[i]) <= 1e-13 * Math.Max(1, Math.Abs(expected[i])), $"step {k} input {i}: {move[i]} vs {expected[i]}");
            }

            lastMove = move;
            applied = [move[0] + 0.3, move[1] - 0.2];
            plant.Advance(applied);
        }

        var station = await (await client.GetAsync("/v1/stations/loop")).ReadJsonAsync();
        Assert.Equal(20, station["stepCount"]!.GetValue<long>());
    }

    [Fact]
    public async Task The_first_step_is_bumpless_from_the_applied_input_or_the_operating_point()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        await client.PutAsync("/v1/stations/held", Json(new JsonObject { ["model"] = id }));
        await client.PutAsync("/v1/stations/unread", Json(new JsonObject { ["model"] = id }));

        // Far from the setpoint: the unconstrained move would jump; the rate limit (5 per step) binds from 30.
        var held = await StepAsync(client, "held", 0, [-17.0, -17.5], [30, 30], Reference);
        Assert.Contains(Codes(held), c => c == "estimate-initialised");
        var move = held["firstMove"]!.Doubles();
        Assert.All(move, u => Assert.InRange(u, 30 - 5 - 1e-9, 30 + 5 + 1e-9));

        var unread = await StepAsync(client, "unread", 0, [-17.0, -17.5], null, Reference);
        Assert.Contains(Codes(unread), c => c == "applied-input-from-operating-point");
        Assert.All(unread["firstMove"]!.Doubles(), u => Assert.InRange(u, 60 - 5 - 1e-9, 60 + 5 + 1e-9));
        var station = await (await client.GetAsync("/v1/stations/unread")).ReadJsonAsync();
        Assert.Equal([60.0, 60.0], station["lastAppliedInput"]!.Doubles());
    }

    [Fact]
    public async Task A_stale_sequence_is_a_409_carrying_the_current_sequence()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        await client.PutAsync("/v1/stations/s", Json(new JsonObject { ["model"] = id }));
        await StepAsync(client, "s", 0, [-20.5, -19.8], [60, 60]);
        await StepAsync(client, "s", 1, [-20.4, -19.9], [61, 59]);

        foreach (long stale in new long[] { 0, 1, 5 })
        {
            var response = await client.PostJsonAsync("/v1/stations/s/step", StepBody(stale, [-20.3, -19.9], [61, 59], null));
            var errors = await response.ReadProblemAsync(HttpStatusCode.Conflict);
            Assert.Contains(errors, e => e.Path == "sequence");
            var problem = JsonNode.Parse(await response.Content.ReadAsStringAsync())!;
            Assert.Equal(2, problem["currentSequence"]!.GetValue<long>());
        }

        Assert.Equal(2, (await (await client.GetAsync("/v1/stations/s")).ReadJsonAsync())["stepCount"]!.GetValue<long>());
    }

    [Fact]
    public async Task An_identical_retry_returns_the_stored_answer_without_stepping_again()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        await client.PutAsync("/v1/stations/r", Json(new JsonObject { ["model"] = id }));
        await StepAsync(client, "r", 0, [-20.5, -19.8], [60, 60]);
        var first = await StepAsync(client, "r", 1, [-20.4, -19.9], [61, 59], Reference);

        // The same body with other spacing, key order and number spelling is the same step.
        var retry = await client.PostJsonAsync("/v1/stations/r/step",
            """{ "reference": [-21.0, -1.95e1], "appliedInput": [61.0, 59], "measurement": [-20.40, -19.9], "sequence": 1 }""");
        Assert.Equal(HttpStatusCode.OK, retry.StatusCode);
        Assert.Equal(first.ToJsonString(), (await retry.ReadJsonAsync()).ToJsonString());
        var station = await (await client.GetAsync("/v1/stations/r")).ReadJsonAsync();
        Assert.Equal(2, station["stepCount"]!.GetValue<long>());
        Assert.Equal(2, station["sequence"]!.GetValue<long>());

        // A different body at the old sequence is not a retry.
        var changed = await client.PostJsonAsync("/v1/stations/r/step", StepBody(1, [-20.4, -19.9], [61, 59.5], Reference));
        await changed.ReadProblemAsync(HttpStatusCode.Conflict);
    }

    [Fact]
    public async Task Fifty_concurrent_steps_with_one_sequence_are_applied_exactly_once()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        await client.PutAsync("/v1/stations/c", Json(new JsonObject { ["model"] = id }));

        // Half send one body (retries of each other), half each a body of its own.
        var responses = await Task.WhenAll(Enumerable.Range(0, 50).Select(i => client.PostJsonAsync(
            "/v1/stations/c/step",
            StepBody(0, i % 2 == 0 ? [-20.5, -19.8] : [-20.5 + (i * 1e-3), -19.8], [60, 60], Reference))));

        var ok = responses.Where(r => r.StatusCode == HttpStatusCode.OK).ToList();
        Assert.All(responses, r => Assert.Contains(r.StatusCode, new[] { HttpStatusCode.OK, HttpStatusCode.Conflict }));
        var answers = (await Task.WhenAll(ok.Select(r => r.Content.ReadAsStringAsync()))).Distinct().ToList();
        Assert.Single(answers);
        var station = await (await client.GetAsync("/v1/stations/c")).ReadJsonAsync();
        Assert.Equal(1, station["stepCount"]!.GetValue<long>());
        Assert.Equal(1, station["sequence"]!.GetValue<long>());
    }

    [Fact]
    public async Task Track_mode_returns_no_move_and_advances_the_estimate()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        await client.PutAsync("/v1/stations/t", Json(new JsonObject { ["model"] = id }));
        var first = await StepAsync(client, "t", 0, [-20.5, -19.8], [60, 60]);

        var body = StepBody(1, [-20.2, -19.7], [75, 40], null);
        body["mode"] = "track";
        var response = await client.PostJsonAsync("/v1/stations/t/step", body);
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var tracked = await response.ReadJsonAsync();
        Assert.Null(tracked["firstMove"]);
        Assert.Equal("tracking", tracked["status"]!.GetValue<string>());
        Assert.Equal(2, tracked["sequence"]!.GetValue<long>());

        var byHand = await (await client.PostJsonAsync($"/v1/models/{id}/estimate", EstimateBody(first["estimate"], [75, 40], [-20.2, -19.7]))).ReadJsonAsync();
        Assert.Equal(byHand["estimate"]!["state"]!.Doubles(), tracked["estimate"]!["state"]!.Doubles());
        Assert.Equal(byHand["estimate"]!["disturbance"]!.Doubles(), tracked["estimate"]!["disturbance"]!.Doubles());
        Assert.NotEqual(first["estimate"]!["state"]!.Doubles(), tracked["estimate"]!["state"]!.Doubles());

        var station = await (await client.GetAsync("/v1/stations/t")).ReadJsonAsync();
        Assert.Null(station["lastSuggestedMove"]);
        Assert.Equal([75.0, 40.0], station["lastAppliedInput"]!.Doubles());

        // Back in auto without saying what was applied: there is no suggested move to assume.
        var errors = await (await client.PostJsonAsync("/v1/stations/t/step", StepBody(2, [-20.1, -19.7], null, null))).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(errors, e => e.Path == "appliedInput");
    }

    [Fact]
    public async Task The_state_survives_a_restart_on_the_same_database()
    {
        string database;
        string id;
        JsonNode before;
        await using (var first = new LookaheadFactory { KeepDatabase = true })
        {
            database = first.DatabasePath;
            var client = first.CreateClient();
            id = await client.RegisterAsync(Model);
            await client.PutAsync("/v1/stations/kept", Json(new JsonObject { ["model"] = id }));
            await StepAsync(client, "kept", 0, [-20.5, -19.8], [60, 60], Reference);
            await StepAsync(client, "kept", 1, [-20.4, -19.9], null, Reference);
            before = await (await client.GetAsync("/v1/stations/kept")).ReadJsonAsync();
        }

        try
        {
            await using var second = new LookaheadFactory(databasePath: database);
            var again = second.CreateClient();
            var after = await (await again.GetAsync("/v1/stations/kept")).ReadJsonAsync();
            Assert.Equal(before.ToJsonString(), after.ToJsonString());

            var next = await StepAsync(again, "kept", 2, [-20.3, -19.9], null, Reference);
            var byHand = await (await again.PostJsonAsync($"/v1/models/{id}/estimate", EstimateBody(before["estimate"], before["lastSuggestedMove"]!.Doubles(), [-20.3, -19.9]))).ReadJsonAsync();
            Assert.Equal(byHand["estimate"]!["state"]!.Doubles(), next["estimate"]!["state"]!.Doubles());
        }
        finally
        {
            Directory.Delete(Path.GetDirectoryName(database)!, recursive: true);
        }
    }

    [Theory]
    [InlineData("""{"measurement":[-20,-20],"appliedInput":[60,60]}""", "sequence")]
    [InlineData("""{"sequence":0,"measurement":[-20],"appliedInput":[60,60]}""", "measurement")]
    [InlineData("""{"sequence":0,"measurement":[-20,-20],"appliedInput":[60,60,1]}""", "appliedInput")]
    [InlineData("""{"sequence":0,"measurement":[-20,-20],"appliedInput":[60,60],"reference":[1]}""", "reference")]
    [InlineData("""{"sequence":0,"measurement":[-20,-20],"appliedInput":[60,60],"disturbance":[1]}""", "disturbance")]
    [InlineData("""{"sequence":0,"measurement":[-20,-20],"appliedInput":[60,60],"mode":"manual"}""", "mode")]
    [InlineData("""{"sequence":0,"measurement":[-20,-20],"mode":"track"}""", "appliedInput")]
    [InlineData("""{"sequence":0,"appliedInput":[60,60]}""", "measurement")]
    [InlineData("""{"sequence":0,"measurment":[-20,-20]}""", "measurment")]
    public async Task A_bad_step_is_a_400_naming_the_field_and_changes_nothing(string body, string path)
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        await client.PutAsync("/v1/stations/bad", Json(new JsonObject { ["model"] = id }));
        var errors = await (await client.PostJsonAsync("/v1/stations/bad/step", body)).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(errors, e => e.Path == path);
        Assert.Equal(0, (await (await client.GetAsync("/v1/stations/bad")).ReadJsonAsync())["sequence"]!.GetValue<long>());
    }

    [Fact]
    public async Task A_station_needs_a_known_model_with_an_estimator_and_a_well_formed_name()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string plain = await client.RegisterAsync(TestModels.DoubleIntegrator);
        foreach (var body in new[] { "{}", $$"""{"model":"{{plain}}"}""", """{"model":"no-such-alias"}""", $$"""{"model":"{{new string('a', 64)}}"}""", """{"model":"Not An Id"}""" })
        {
            var errors = await (await client.PutAsync("/v1/stations/x", Json(body))).ReadProblemAsync(HttpStatusCode.BadRequest);
            Assert.Contains(errors, e => e.Path == "model");
        }

        var name = await (await client.GetAsync("/v1/stations/Bad%20Name")).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(name, e => e.Path == "name");
        await (await client.GetAsync("/v1/stations/x")).ReadProblemAsync(HttpStatusCode.NotFound);
        await (await client.PostJsonAsync("/v1/stations/x/step", """{"sequence":0,"measurement":[0,0]}""")).ReadProblemAsync(HttpStatusCode.NotFound);
    }

    /// <summary>The plant the loop runs on (deviations from −20 °C / 60 %): gains 20 % above the model and a constant load.</summary>
    private sealed class TruePlant
    {
        private double[] x = [0.3, -0.1];

        public double[] Measure() => [x[0] - 20, x[1] - 20];

        public void Advance(double[] u)
        {
            double du0 = u[0] - 60, du1 = u[1] - 60;
            x = [(0.9 * x[0]) + (0.05 * x[1]) + (0.12 * du0) + 0.05, (0.04 * x[0]) + (0.85 * x[1]) + (0.024 * du0) + (0.096 * du1) - 0.03];
        }
    }
}
