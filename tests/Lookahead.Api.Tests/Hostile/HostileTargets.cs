using System.Globalization;
using System.Net;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>
/// What the hostile corpus aims at: models, an alias and stations stored before it runs (their stored form is compared
/// afterwards), and one valid request per endpoint to mutate. Every valid request is sent once while the targets are
/// set up (a station's step on a probe station), so each mutation starts from a request the service accepts.
/// </summary>
public sealed class HostileTargets
{
    public const string Alias = "hostile-zones";
    public const string Station = "hostile-station";
    public const string ProbeStation = "hostile-probe";

    /// <summary>Two zones with an output-disturbance estimator, limits and an operating point; discrete (invented numbers).</summary>
    public const string ZonesDocument = """
        {
          "name": "hostile-zones",
          "plant": { "a": [[0.9, 0.05], [0.04, 0.85]], "b": [[0.1, 0.0], [0.02, 0.08]], "c": [[1, 0], [0, 1]], "sampleTime": 60, "timeDomain": "discrete" },
          "cost": { "horizon": 15, "outputWeight": [1.0, 1.0], "inputWeight": [0.05, 0.05], "inputRateWeight": [0.1, 0.1] },
          "limits": { "inputMin": [0, 0], "inputMax": [100, 100], "inputRateMin": [-5, -5], "inputRateMax": [5, 5] },
          "labels": { "states": ["zone_a", "zone_b"], "inputs": ["fan_a", "fan_b"], "outputs": ["t_a", "t_b"], "units": { "outputs": ["°C", "°C"] } },
          "operatingPoint": { "state": [-20, -20], "input": [60, 60], "output": [-20, -20] },
          "estimator": { "processNoise": [1e-4, 1e-4, 1e-2, 1e-2], "measurementNoise": [[1e-3, 0], [0, 1e-3]] }
        }
        """;

    private HostileTargets(IReadOnlyList<TargetModel> models, string zonesId)
    {
        Models = models;
        ZonesId = zonesId;
    }

    /// <summary>Every model the corpus aims at, each with its document and a valid request for every endpoint it has.</summary>
    public IReadOnlyList<TargetModel> Models { get; }

    /// <summary>The model the alias and the stations use (it has an estimator).</summary>
    public string ZonesId { get; }

    public TargetModel Zones => Models.Single(m => m.Id == ZonesId);

    /// <summary>A valid step for <see cref="Station"/> (at sequence 1): sent to the probe station, never to the target.</summary>
    public static JsonObject StepBody(long sequence, string timestamp) => new()
    {
        ["sequence"] = sequence,
        ["measurement"] = new JsonArray(-20.4, -19.9),
        ["appliedInput"] = new JsonArray(61.0, 59.0),
        ["reference"] = new JsonArray(-21.0, -19.5),
        ["timestamp"] = timestamp,
        ["mode"] = "auto",
    };

    public static async Task<HostileTargets> CreateAsync(HttpClient client)
    {
        var models = new List<TargetModel>
        {
            await TargetModel.RegisterAsync(client, "double-integrator", TestModels.DoubleIntegrator, plan: """{"state":[0.5,-0.2],"reference":[1,0],"previousInput":[0]}""",
                simulate: """{"initialState":[0.5,-0.2],"steps":5,"references":[{"fromStep":0,"reference":[1,0]},{"fromStep":3,"reference":[0.5,0]}],"previousInput":[0],"disturbances":[[0.01,0]]}""",
                csv: "x1,x2,r1,r2,prev1\n0.5,-0.2,1,0,0\n0.4,-0.1,1,0,0\n0.3,0,1,0,0\n"),
            await TargetModel.RegisterAsync(client, "two-tanks", TestModels.TwoTanks, plan: """{"state":[0.5,-0.2],"reference":[1,0.5],"previousInput":[0.1,0.1]}""",
                simulate: """{"initialState":[0.5,-0.2],"steps":5,"references":[{"fromStep":0,"reference":[1,0.5]}],"previousInput":[0.1,0.1],"truePlant":{"a":[[-0.021,0.01],[0.01,-0.031]],"b":[[0.05,0.0],[0.0,0.04]],"timeDomain":"continuous"}}""",
                csv: "level_1,level_2,r1,r2,prev_valve_1,prev_valve_2\n0.5,-0.2,1,0.5,0.1,0.1\n0.4,-0.1,1,0.5,0.1,0.1\n"),
            await TargetModel.RegisterAsync(client, "cold-store", TestModels.DemoDocument, plan: """{"state":[-20,-21,-19],"reference":[-20,-20,-20],"previousInput":[50,50,20],"disturbance":[15]}""",
                simulate: """{"initialState":[-20,-21,-19],"steps":4,"references":[{"fromStep":0,"reference":[-20,-20,-20]}],"previousInput":[50,50,20],"measuredDisturbances":[{"fromStep":0,"disturbance":[15]}],"outputDisturbance":[{"fromStep":2,"offset":[0.1,0,0]}],"feedback":"estimate","measurementNoise":{"standardDeviation":[0.01,0.01,0.01],"seed":3}}""",
                csv: "y1,y2,y3,applied1,applied2,applied3,v1,r1,r2,r3\n-20,-21,-19,50,50,20,15,-20,-20,-20\n-20.1,-20.9,-19.1,50,50,20,15,-20,-20,-20\n",
                estimate: """{"estimate":{"state":[-20,-21,-19],"disturbance":[0,0,0]},"appliedInput":[50,50,20],"measurement":[-20.1,-20.9,-19.2],"measuredDisturbance":[15]}""",
                estimatePlan: """{"estimate":{"state":[-20,-21,-19],"disturbance":[0.1,0,0]},"reference":[-20,-20,-20],"previousInput":[50,50,20],"disturbance":[[15],[16]]}"""),
            await TargetModel.RegisterAsync(client, "zones", ZonesDocument, plan: """{"state":[-20,-20.5],"reference":[-21,-19.5],"previousInput":[60,60]}""",
                simulate: """{"initialState":[-20,-20.5],"steps":5,"references":[{"fromStep":0,"reference":[-21,-19.5]}],"previousInput":[60,60],"feedback":"estimate","outputDisturbance":[{"fromStep":1,"offset":[0.2,0]}]}""",
                csv: "y_t_a,y_t_b,applied_fan_a,applied_fan_b,r1,r2\n-20,-20.5,60,60,-21,-19.5\n-20.1,-20.4,61,59,-21,-19.5\n",
                estimate: """{"estimate":{"state":[-20,-20.5],"disturbance":[0,0]},"appliedInput":[60,60],"measurement":[-20.1,-20.4]}""",
                estimatePlan: """{"estimate":{"state":[-20,-20.5],"disturbance":[0.1,-0.1]},"reference":[[-21,-19.5],[-21.5,-19.5]],"previousInput":[60,60]}"""),
            await TargetModel.RegisterAsync(client, "twelve-states", TwelveStateDocument(), plan: TwelveStatePlan(),
                simulate: null, csv: null),
        };

        string zones = models.Single(m => m.Name == "zones").Id;
        await ExpectAsync(client.PutAsync($"/v1/aliases/{Alias}", Support.Stations.Json(new JsonObject { ["modelId"] = zones })), HttpStatusCode.Created);
        foreach (var station in new[] { Station, ProbeStation })
        {
            await ExpectAsync(client.PutAsync($"/v1/stations/{station}", Support.Stations.Json(new JsonObject { ["model"] = Alias, ["detail"] = "full" })), HttpStatusCode.Created);
            var first = StepBody(0, "2026-01-01T00:00:00Z");
            first["measurement"] = new JsonArray(-20.5, -19.8);
            first["appliedInput"] = new JsonArray(60.0, 60.0);
            await ExpectAsync(client.PostJsonAsync($"/v1/stations/{station}/step", first), HttpStatusCode.OK);
        }

        // The body every step mutation starts from is a valid next step: the probe station takes it.
        await ExpectAsync(client.PostJsonAsync($"/v1/stations/{ProbeStation}/step", StepBody(1, "2026-01-01T00:01:00Z")), HttpStatusCode.OK);
        return new HostileTargets(models, zones);
    }

    /// <summary>A stable twelve-state plant with three inputs and four outputs (seeded, invented numbers): big enough that its matrix entries are sampled.</summary>
    private static string TwelveStateDocument()
    {
        var random = new Random(12);
        string Row(int columns, Func<int, double> value) => "[" + string.Join(",", Enumerable.Range(0, columns).Select(j => value(j).ToString("R", CultureInfo.InvariantCulture))) + "]";
        string Matrix(int rows, int columns, Func<int, int, double> value) => "[" + string.Join(",", Enumerable.Range(0, rows).Select(i => Row(columns, j => value(i, j)))) + "]";
        string a = Matrix(12, 12, (i, j) => i == j ? 0.8 : Math.Round((random.NextDouble() - 0.5) * 0.02, 4));
        string b = Matrix(12, 3, (_, _) => Math.Round(random.NextDouble() * 0.1, 4));
        string c = Matrix(4, 12, (i, j) => j % 4 == i ? 1.0 : 0.0);
        return $$"""
            {
              "name": "twelve-states",
              "plant": { "a": {{a}}, "b": {{b}}, "c": {{c}}, "sampleTime": 1, "timeDomain": "discrete" },
              "cost": { "horizon": 8, "outputWeight": [1, 1, 1, 1], "inputWeight": [0.1, 0.1, 0.1] },
              "limits": { "inputMin": [-1, -1, -1], "inputMax": [1, 1, 1] }
            }
            """;
    }

    private static string TwelveStatePlan() =>
        "{\"state\":[" + string.Join(",", Enumerable.Range(0, 12).Select(i => (0.1 * (i % 5)).ToString("R", CultureInfo.InvariantCulture))) + "],\"reference\":[0.1,0,0,0.2]}";

    private static async Task ExpectAsync(Task<HttpResponseMessage> sending, HttpStatusCode status)
    {
        var response = await sending;
        Assert.True(response.StatusCode == status, $"setting up the hostile targets: expected {(int)status}, got {(int)response.StatusCode}: {await response.Content.ReadAsStringAsync()}");
    }

    /// <summary>A registered model with a valid request for each endpoint it has (null where it has none).</summary>
    public sealed record TargetModel(string Name, string Id, JsonNode Document, JsonNode Plan, JsonNode? Simulate, string? Csv, JsonNode? Estimate, JsonNode? EstimatePlan)
    {
        public bool HasEstimator => Document["estimator"] is not null;

        public static async Task<TargetModel> RegisterAsync(
            HttpClient client, string name, string document, string plan, string? simulate, string? csv, string? estimate = null, string? estimatePlan = null)
        {
            // The demo model may already be registered by the service's own seeding: 200 and 201 both give its id.
            var registered = await client.PostJsonAsync("/v1/models", document);
            string text = await registered.Content.ReadAsStringAsync();
            Assert.True(registered.IsSuccessStatusCode, $"registering {name}: {(int)registered.StatusCode} {text}");
            string id = JsonNode.Parse(text)!["id"]!.GetValue<string>();
            var model = new TargetModel(name, id, JsonNode.Parse(document)!, JsonNode.Parse(plan)!, simulate is null ? null : JsonNode.Parse(simulate), csv, estimate is null ? null : JsonNode.Parse(estimate), estimatePlan is null ? null : JsonNode.Parse(estimatePlan));
            await model.CheckValidAsync(client);
            return model;
        }

        /// <summary>Each valid request is answered 200 (replays with no failed row), so a refusal of a mutation is the mutation's doing.</summary>
        private async Task CheckValidAsync(HttpClient client)
        {
            await ExpectAsync(client.PostJsonAsync($"/v1/models/{Id}/plan", Plan), HttpStatusCode.OK);
            if (Simulate is not null)
            {
                await ExpectAsync(client.PostJsonAsync($"/v1/models/{Id}/simulate", Simulate), HttpStatusCode.OK);
            }

            if (Estimate is not null)
            {
                await ExpectAsync(client.PostJsonAsync($"/v1/models/{Id}/estimate", Estimate), HttpStatusCode.OK);
                await ExpectAsync(client.PostJsonAsync($"/v1/models/{Id}/plan", EstimatePlan!), HttpStatusCode.OK);
            }

            var replays = new List<(string Body, string Type)> { (ReplayJson(), "application/json"), (ReplayNdjson(), "application/x-ndjson") };
            if (Csv is not null)
            {
                replays.Add((Csv, "text/csv"));
            }

            foreach (var (body, type) in replays)
            {
                var response = await client.PostAsync($"/v1/models/{Id}/plans", body, type);
                string answer = await response.Content.ReadAsStringAsync();
                Assert.True(response.StatusCode == HttpStatusCode.OK && !answer.Contains("error", StringComparison.Ordinal), $"valid {type} replay of {Name}: {(int)response.StatusCode} {answer}");
            }
        }

        /// <summary>Three rows of the model's plan request (estimate rows for a model planned from an estimate).</summary>
        public IReadOnlyList<JsonNode> ReplayRows => [Plan, Plan, Plan];

        public string ReplayJson() => new JsonObject { ["detail"] = "first-move", ["requests"] = new JsonArray(ReplayRows.Select(r => r.DeepClone()).ToArray()) }.ToJsonString();

        public string ReplayNdjson() => string.Join("\n", ReplayRows.Select(r => r.ToJsonString())) + "\n";
    }
}
