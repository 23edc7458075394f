using System.Globalization;
using System.Net;
using System.Text;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// /plan and every replay format go through one parser and one runner, so the same request must give the same
/// first move and cost whichever way it comes in.
/// </summary>
public class PlanPipelineTests
{
    // (state, reference, previous input) for the two-tank model: regulation, tracking, tracking from a held input.
    private static readonly (double[] State, double[]? Reference, double[]? Previous)[] TankRequests =
    [
        ([0.5, -0.2], null, null),
        ([0.5, -0.2], [1.0, 0.5], null),
        ([-1.25, 0.75], [0.2, -0.1], [0.3, -0.4]),
        ([0.0, 0.0], [1.0, 1.0], [0.0, 0.0]),
    ];

    // For the demo: warm and cold zones, with and without a previous input, some pressing on the limits.
    private static readonly (double[] State, double[]? Reference, double[]? Previous)[] DemoRequests =
    [
        // The demo is in engineering units: zones in °C around −20, inputs in %.
        ([-19.0, -19.5, -20.0], null, null),
        ([-17.0, -17.5, -18.0], null, [50, 50, 0]),
        ([-21.0, -19.8, -19.6], [-20.0, -20.0, -19.5], [10, 20, 30]),
        ([-18.0, -22.5, -18.5], [-19.5, -19.5, -19.5], null),
        ([-14.0, -14.0, -14.0], null, [100, 100, 100]),
    ];

    [Fact]
    public Task A_model_without_limits_answers_the_same_through_plan_and_every_replay_format() =>
        CheckAsync(TestModels.TwoTanks, HttpStatusCode.Created, TankRequests);

    [Fact]
    public Task A_model_with_limits_answers_the_same_through_plan_and_every_replay_format() =>
        CheckAsync(TestModels.DemoDocument, HttpStatusCode.OK, DemoRequests); // already registered by the demo seeder

    private static async Task CheckAsync(string model, HttpStatusCode registered, (double[] State, double[]? Reference, double[]? Previous)[] requests)
    {
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Replay:BatchSize"] = "2" });
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(model, registered);
        var bodies = requests.Select(Body).ToArray();

        var single = new List<(double[] Move, double Cost)>();
        foreach (var body in bodies)
        {
            var plan = await (await client.PostJsonAsync($"/v1/models/{id}/plan", body.ToJsonString())).ReadJsonAsync();
            single.Add((plan["inputs"]!.Matrix()[0], plan["cost"]!.GetValue<double>()));
        }

        string ndjson = string.Join('\n', bodies.Select(b => b.ToJsonString()));
        string json = new JsonObject { ["requests"] = new JsonArray(bodies.Select(b => (JsonNode?)b.DeepClone()).ToArray()) }.ToJsonString();

        // Full depth takes the same solve as /plan; replay carries each worker's active limits from row to row (a warm
        // start), which ends at the same optimum by another path: the same numbers to rounding (and /plan's 15 digits;
        // a cost of 155 from a path through 40 active limits differs from the cold one by ~1e-12 relative, and an input
        // on its 0 % bound can sit 6e-10 % off it — the solver's feasibility tolerance on a 0…100 window).
        var fullJson = Results(await (await client.PostJsonAsync($"/v1/models/{id}/plans?detail=full", json)).ReadJsonAsync());
        var fullNdjson = await LinesAsync(client.PostAsync($"/v1/models/{id}/plans?detail=full", ndjson, "application/x-ndjson"));
        foreach (var results in new[] { fullJson, fullNdjson })
        {
            Assert.Equal(requests.Length, results.Count);
            for (int i = 0; i < requests.Length; i++)
            {
                AssertClose([single[i].Cost], [results[i]["cost"]!.GetValue<double>()], 1e-11, $"row {i + 1} cost");
                AssertClose(single[i].Move, results[i]["inputs"]!.Matrix()[0], 1e-9, $"row {i + 1}");
            }
        }

        // First-move depth (replay's default; CSV always): the three formats agree with each other to rounding, and
        // with /plan to the first-move path's documented accuracy.
        var firstJson = Results(await (await client.PostJsonAsync($"/v1/models/{id}/plans", json)).ReadJsonAsync())
            .Select(r => (r["firstMove"]!.Doubles(), r["cost"]!.GetValue<double>())).ToList();
        var firstNdjson = (await LinesAsync(client.PostAsync($"/v1/models/{id}/plans", ndjson, "application/x-ndjson")))
            .Select(r => (r["firstMove"]!.Doubles(), r["cost"]!.GetValue<double>())).ToList();
        var firstCsv = await CsvAsync(client, id, requests);
        for (int i = 0; i < requests.Length; i++)
        {
            AssertClose(firstJson[i].Item1, firstNdjson[i].Item1, 1e-12, $"row {i + 1} NDJSON");
            AssertClose(firstJson[i].Item1, firstCsv[i].Move, 1e-12, $"row {i + 1} CSV");
            AssertClose([firstJson[i].Item2], [firstNdjson[i].Item2], 1e-12, $"row {i + 1} NDJSON cost");
            AssertClose([firstJson[i].Item2], [firstCsv[i].Cost], 1e-12, $"row {i + 1} CSV cost");
            AssertClose(single[i].Move, firstJson[i].Item1, 1e-9, $"row {i + 1}");
            AssertClose([single[i].Cost], [firstJson[i].Item2], 1e-9, $"row {i + 1} cost");
        }
    }

    private static JsonObject Body((double[] State, double[]? Reference, double[]? Previous) request)
    {
        var body = new JsonObject { ["state"] = Array(request.State) };
        if (request.Reference is { } r)
        {
            body["reference"] = Array(r);
        }

        if (request.Previous is { } u)
        {
            body["previousInput"] = Array(u);
        }

        return body;
    }

    private static JsonArray Array(double[] values) => new(values.Select(v => (JsonNode?)JsonValue.Create(v)).ToArray());

    private static List<JsonNode> Results(JsonNode answer) => answer["results"]!.AsArray().Select(r => r!).ToList();

    private static async Task<List<JsonNode>> LinesAsync(Task<HttpResponseMessage> response) =>
        ReplayAnswer.NdjsonResults(await (await response).Content.ReadAsStringAsync());

    private static async Task<List<(double[] Move, double Cost)>> CsvAsync(HttpClient client, string id, (double[] State, double[]? Reference, double[]? Previous)[] requests)
    {
        int n = requests[0].State.Length;
        int p = requests.Select(r => r.Reference?.Length ?? 0).Max();
        int m = requests.Select(r => r.Previous?.Length ?? 0).Max();
        var csv = new StringBuilder();
        csv.AppendJoin(',', Enumerable.Range(1, n).Select(i => $"x{i}").Concat(Enumerable.Range(1, p).Select(i => $"r{i}")).Concat(Enumerable.Range(1, m).Select(i => $"prev{i}"))).Append('\n');
        foreach (var (state, reference, previous) in requests)
        {
            var cells = state.Select(Text)
                .Concat(reference?.Select(Text) ?? Enumerable.Repeat("", p))
                .Concat(previous?.Select(Text) ?? Enumerable.Repeat("", m));
            csv.AppendJoin(',', cells).Append('\n');
        }

        var response = await client.PostAsync($"/v1/models/{id}/plans", csv.ToString(), "text/csv");
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var lines = ReplayAnswer.CsvLines(await response.Content.ReadAsStringAsync());
        var header = lines[0].Split(',');
        int cost = System.Array.IndexOf(header, "cost");
        int status = System.Array.IndexOf(header, "status");
        return lines.Skip(1).Select(line =>
        {
            var fields = line.Split(',');
            Assert.NotEqual("error", fields[status]);
            var move = fields[..cost]; // no pass-through columns: the moves come first
            return (move.Select(f => double.Parse(f, CultureInfo.InvariantCulture)).ToArray(), double.Parse(fields[cost], CultureInfo.InvariantCulture));
        }).ToList();
    }

    private static string Text(double value) => value.ToString("R", CultureInfo.InvariantCulture);

    private static void AssertClose(double[] expected, double[] actual, double relative, string what)
    {
        Assert.Equal(expected.Length, actual.Length);
        double scale = Math.Max(1, expected.Max(Math.Abs));
        for (int i = 0; i < expected.Length; i++)
        {
            Assert.True(Math.Abs(expected[i] - actual[i]) <= relative * scale, $"{what} [{i}]: {expected[i]:R} vs {actual[i]:R}");
        }
    }
}
