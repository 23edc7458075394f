using System.Globalization;
using System.Net;
using System.Text;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Lookahead.Core.Estimation;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// Replay with estimation: rows of measurements and applied inputs run the model's estimator in time order, and each
/// row is planned from its corrected estimate. The reference is the core itself driven in a loop (model.Estimate, then
/// model.Plan from the estimate, the applied input as the previous input); the estimator's own design is checked
/// against SciPy in the core's tests. Also the measured-disturbance columns of a plain CSV replay against /plan.
/// </summary>
public class ReplayEstimationTests
{
    /// <summary>Two cold-store zones in °C around −20, chillers in % around 60, the outdoor temperature measured (invented numbers).</summary>
    private const string Model = """
        {
          "name": "two-zones-estimated-outdoor",
          "plant": { "a": [[0.9, 0.05], [0.04, 0.85]], "b": [[-0.1, 0.0], [-0.02, -0.08]], "c": [[1, 0], [0, 1]], "e": [[0.03], [0.01]],
                     "sampleTime": 60, "timeDomain": "discrete" },
          "cost": { "horizon": 12, "outputWeight": [1.0, 1.0], "inputWeight": [0.05, 0.05], "inputRateWeight": [0.2, 0.2] },
          "limits": { "inputMin": [0, 0], "inputMax": [100, 100] },
          "labels": { "states": ["zone_a", "zone_b"], "inputs": ["chiller_a", "chiller_b"], "outputs": ["temp_a", "temp_b"], "disturbances": ["outdoor"] },
          "operatingPoint": { "state": [-20, -20], "input": [60, 60], "output": [-20, -20], "disturbance": [15] },
          "estimator": { "processNoise": [1e-4, 1e-4, 1e-2, 1e-2], "measurementNoise": [1e-3, 1e-3] }
        }
        """;

    /// <summary>The same model as the core reads it, written out independently of the service's mapping.</summary>
    private static readonly ModelDocument Document = new(
        "two-zones-estimated-outdoor",
        new PlantSpec([[0.9, 0.05], [0.04, 0.85]], [[-0.1, 0.0], [-0.02, -0.08]], [[1, 0], [0, 1]], 60, TimeDomain.Discrete, [[0.03], [0.01]]),
        new CostSpec(12, WeightSpec.FromDiagonal([1.0, 1.0]), WeightSpec.FromDiagonal([0.05, 0.05]), WeightSpec.FromDiagonal([0.2, 0.2])),
        new LimitsSpec([0.0, 0.0], [100.0, 100.0]),
        new LabelsSpec(["zone_a", "zone_b"], ["chiller_a", "chiller_b"], ["temp_a", "temp_b"], Disturbances: ["outdoor"]),
        new OperatingPointSpec([-20.0, -20.0], [60.0, 60.0], [-20.0, -20.0], [15.0]),
        new EstimatorSpec(WeightSpec.FromDiagonal([1e-4, 1e-4, 1e-2, 1e-2]), WeightSpec.FromDiagonal([1e-3, 1e-3])));

    private const int Rows = 23;
    private const int MissingRow = 9; // 0-based: the tenth row has no reading

    private static async Task<(HttpClient Client, string Id, LookaheadFactory Factory)> StartAsync(string model)
    {
        // Small batches and several workers, so the chain crosses batches and a parallel plan would break it.
        var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Replay:BatchSize"] = "4", ["Replay:MaxDegreeOfParallelism"] = "4" });
        var client = factory.CreateClient();
        return (client, await client.RegisterAsync(model), factory);
    }

    /// <summary>A noisy export of an invented run: a slightly stronger true plant, a load, varying chillers and outdoor temperature.</summary>
    private static History MakeHistory()
    {
        var random = new Random(7);
        double[] x = [0.3, -0.2];
        var history = new History();
        for (int k = 0; k < Rows; k++)
        {
            double[] u = [60 + (12 * Math.Sin(k / 3.0)), 55 + (8 * Math.Cos(k / 4.0))];
            double outdoor = 15 + (5 * Math.Sin(k / 6.0));
            double[] du = [u[0] - 60, u[1] - 60];
            double dv = outdoor - 15;
            x = [
                (0.9 * x[0]) + (0.05 * x[1]) - (0.12 * du[0]) + (0.03 * dv) + 0.04,
                (0.04 * x[0]) + (0.85 * x[1]) - (0.024 * du[0]) - (0.096 * du[1]) + (0.01 * dv) - 0.02,
            ];
            double[]? y = k == MissingRow ? null : [x[0] - 20 + (0.01 * (random.NextDouble() - 0.5)), x[1] - 20 + (0.01 * (random.NextDouble() - 0.5))];
            double[]? r = k % 5 == 2 ? [-21.0, -19.5] : null;
            history.Add(u, y, outdoor, r);
        }

        return history;
    }

    /// <summary>The core driven directly: one estimate carried from row to row, each row planned from its corrected estimate.</summary>
    private static List<(StateEstimate Estimate, double[] FirstMove, double Cost, bool Initialised, bool MeasurementUsed)> Expected(History history, ISet<int>? brokenRows = null)
    {
        var model = ModelCompiler.Compile(Document);
        var expected = new List<(StateEstimate, double[], double, bool, bool)>();
        StateEstimate? previous = null;
        for (int k = 0; k < history.Count; k++)
        {
            if (brokenRows?.Contains(k) == true)
            {
                previous = null;
                expected.Add((null!, [], double.NaN, false, false));
                continue;
            }

            var sample = model.Estimate(new EstimateRequest(previous, history.Applied[k], history.Measured[k], [history.Outdoor[k]]));
            previous = sample.Estimate;
            var plan = model.Plan(new PlanRequest(sample.Estimate.State, history.Reference[k], history.Applied[k], Disturbance: [[history.Outdoor[k]]], DisturbanceEstimate: sample.Estimate.Disturbance));
            expected.Add((sample.Estimate, plan.Input(0).ToArray(), plan.Cost, sample.Initialised, sample.MeasurementUsed));
        }

        return expected;
    }

    [Fact]
    public async Task Csv_estimation_replay_gives_the_cores_estimates_and_first_moves_row_by_row()
    {
        var (client, id, factory) = await StartAsync(Model);
        await using var _ = factory;
        var history = MakeHistory();
        var csv = new StringBuilder("timestamp,y_temp_a,y2,applied_chiller_a,applied2,r_temp_a,r2,v_outdoor\n");
        for (int k = 0; k < history.Count; k++)
        {
            var y = history.Measured[k];
            var r = history.Reference[k];
            csv.Append(CultureInfo.InvariantCulture, $"{k * 60},")
                .Append(y is null ? "," : $"{F(y[0])},{F(y[1])}").Append(',')
                .Append(CultureInfo.InvariantCulture, $"{F(history.Applied[k][0])},{F(history.Applied[k][1])},")
                .Append(r is null ? "," : $"{F(r[0])},{F(r[1])}").Append(',')
                .Append(F(history.Outdoor[k])).Append('\n');
        }

        // Labelled and generic names mix freely; the timestamp is passed through.
        var response = await client.PostAsync($"/v1/models/{id}/plans", csv.ToString(), "text/csv");
        var text = await response.Content.ReadAsStringAsync();
        Assert.True(response.StatusCode == HttpStatusCode.OK, text);
        var lines = ReplayAnswer.CsvRecords(text);
        Assert.Equal(["timestamp", "chiller_a", "chiller_b", "xhat_zone_a", "xhat_zone_b", "dhat1", "dhat2", "cost", "status", "message"], lines[0]);
        Assert.Equal(history.Count + 1, lines.Count);

        var expected = Expected(history);
        for (int k = 0; k < history.Count; k++)
        {
            var fields = lines[k + 1];
            var (estimate, move, cost, initialised, used) = expected[k];
            Assert.Equal((k * 60).ToString(CultureInfo.InvariantCulture), fields[0]);
            Assert.Equal("optimal", fields[8]);
            AssertClose(estimate.State, [D(fields[3]), D(fields[4])], 1e-12, $"row {k + 1} x̂");
            AssertClose(estimate.Disturbance, [D(fields[5]), D(fields[6])], 1e-12, $"row {k + 1} d̂");
            AssertClose(move, [D(fields[1]), D(fields[2])], 1e-8, $"row {k + 1} first move");
            AssertClose([cost], [D(fields[7])], 1e-8, $"row {k + 1} cost");
            Assert.Equal(!used, fields[9].Contains("measurement-missing: no measurement this sample", StringComparison.Ordinal));
            Assert.Equal(initialised, fields[9].Contains("estimate-initialised:", StringComparison.Ordinal));
        }

        Assert.True(expected[0].Initialised);
        Assert.False(expected[MissingRow].MeasurementUsed);
    }

    [Fact]
    public async Task Ndjson_estimation_replay_gives_the_cores_estimates_and_a_broken_row_restarts_the_chain()
    {
        var (client, id, factory) = await StartAsync(Model);
        await using var _ = factory;
        var history = MakeHistory();
        const int Broken = 15;
        var body = new StringBuilder();
        for (int k = 0; k < history.Count; k++)
        {
            if (k == Broken)
            {
                body.Append("""{"measurement":[-20,-20],"appliedInput":[60]}""").Append('\n');
                continue;
            }

            var row = new JsonObject
            {
                ["measurement"] = history.Measured[k] is { } y ? Array(y) : null,
                ["appliedInput"] = Array(history.Applied[k]),
                ["disturbance"] = Array([history.Outdoor[k]]),
            };
            if (history.Reference[k] is { } r)
            {
                row["reference"] = Array(r);
            }

            body.Append(row.ToJsonString()).Append('\n');
        }

        var response = await client.PostAsync($"/v1/models/{id}/plans", body.ToString(), "application/x-ndjson");
        var text = await response.Content.ReadAsStringAsync();
        Assert.True(response.StatusCode == HttpStatusCode.OK, text);
        var results = ReplayAnswer.NdjsonResults(text);
        Assert.Equal(history.Count, results.Count);

        var expected = Expected(history, new HashSet<int> { Broken });
        for (int k = 0; k < history.Count; k++)
        {
            var result = results[k];
            Assert.Equal(k + 1, result["row"]!.GetValue<long>());
            if (k == Broken)
            {
                Assert.Equal("error", result["status"]!.GetValue<string>());
                Assert.Contains(result["errors"]!.AsArray(), e => e!["path"]!.GetValue<string>() == "appliedInput");
                continue;
            }

            var (estimate, move, cost, initialised, used) = expected[k];
            Assert.Equal("optimal", result["status"]!.GetValue<string>());
            AssertClose(estimate.State, result["estimate"]!["state"]!.Doubles(), 1e-12, $"row {k + 1} x̂");
            AssertClose(estimate.Disturbance, result["estimate"]!["disturbance"]!.Doubles(), 1e-12, $"row {k + 1} d̂");
            AssertClose(move, result["firstMove"]!.Doubles(), 1e-8, $"row {k + 1} first move");
            AssertClose([cost], [result["cost"]!.GetValue<double>()], 1e-8, $"row {k + 1} cost");
            var codes = result["warnings"]?.AsArray().Select(w => w!["code"]!.GetValue<string>()).ToList() ?? [];
            Assert.Equal(!used, codes.Contains("measurement-missing"));
            Assert.Equal(initialised, codes.Contains("estimate-initialised"));
        }

        // The row after the broken one starts again from its own measurement.
        Assert.True(expected[Broken + 1].Initialised);
    }

    [Fact]
    public async Task Json_estimation_replay_names_its_rows_in_paths_and_carries_the_estimate()
    {
        var (client, id, factory) = await StartAsync(Model);
        await using var _ = factory;
        const string Body = """
            {"requests":[
              {"measurement":[-20.2,-19.9],"appliedInput":[60,60],"disturbance":[15]},
              {"measurement":null,"appliedInput":[62,58],"disturbance":[15]},
              {"measurement":[-20.1,-19.8,1],"appliedInput":[62,58]},
              {"measurement":[-20.1,-19.8],"appliedInput":[62,58],"previousInput":[1,1]}
            ]}
            """;

        var result = await (await client.PostJsonAsync($"/v1/models/{id}/plans", Body)).ReadJsonAsync();
        var rows = result["results"]!.AsArray();

        var model = ModelCompiler.Compile(Document);
        var first = model.Estimate(new EstimateRequest(null, [60.0, 60.0], [-20.2, -19.9], [15.0]));
        var second = model.Estimate(new EstimateRequest(first.Estimate, [62.0, 58.0], null, [15.0]));
        AssertClose(first.Estimate.State, rows[0]!["estimate"]!["state"]!.Doubles(), 1e-12, "row 1");
        AssertClose(second.Estimate.State, rows[1]!["estimate"]!["state"]!.Doubles(), 1e-12, "row 2");
        Assert.Contains(rows[2]!["errors"]!.AsArray(), e => e!["path"]!.GetValue<string>() == "requests[2].measurement");
        Assert.Contains(rows[3]!["errors"]!.AsArray(), e => e!["path"]!.GetValue<string>() == "requests[3].previousInput");
        Assert.Equal(2, result["failedRows"]!.GetValue<long>());
    }

    [Fact]
    public async Task Estimation_replays_are_refused_with_400_naming_the_column_or_field()
    {
        var (client, id, factory) = await StartAsync(Model);
        await using var _ = factory;
        string plain = await client.RegisterAsync(TestModels.TwoTanks);

        // No estimator: measurement columns or fields cannot be replayed.
        var noEstimatorCsv = await (await client.PostAsync($"/v1/models/{plain}/plans", "t,y_h1,y_h2,applied_valve_1,applied_valve_2\n1,0,0,0,0\n", "text/csv")).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(noEstimatorCsv, e => e.Path == "header" && e.Reason.Contains("'y_h1'", StringComparison.Ordinal) && e.Reason.Contains("no estimator", StringComparison.Ordinal));
        var noEstimatorNdjson = await (await client.PostAsync($"/v1/models/{plain}/plans", "{\"measurement\":[0,0],\"appliedInput\":[0,0]}\n", "application/x-ndjson")).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(noEstimatorNdjson, e => e.Path == "measurement" && e.Reason.Contains("no estimator", StringComparison.Ordinal));

        // States and measurements mixed.
        var mixedCsv = await (await client.PostAsync($"/v1/models/{id}/plans", "zone_a,zone_b,y1,y2,applied1,applied2\n-20,-20,-20,-20,60,60\n", "text/csv")).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(mixedCsv, e => e.Path == "header" && e.Reason.Contains("'zone_a'", StringComparison.Ordinal) && e.Reason.Contains("'y1'", StringComparison.Ordinal));
        var mixedJson = await (await client.PostJsonAsync($"/v1/models/{id}/plans", """{"requests":[{"state":[-20,-20],"measurement":[-20,-20],"appliedInput":[60,60]}]}""")).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(mixedJson, e => e.Path == "requests[0].measurement");

        // Wrong column counts: an applied input column missing, a previous-input column that has no place here.
        var missing = await (await client.PostAsync($"/v1/models/{id}/plans", "y1,y2,applied_chiller_a\n-20,-20,60\n", "text/csv")).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(missing, e => e.Path == "header" && e.Reason.Contains("missing appliedInput column 'applied_chiller_b' (or 'applied2')", StringComparison.Ordinal));
        var missingY = await (await client.PostAsync($"/v1/models/{id}/plans", "temp_a_y,y_temp_a,applied1,applied2\n1,-20,60,60\n", "text/csv")).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(missingY, e => e.Path == "header" && e.Reason.Contains("'y_temp_b' (or 'y2')", StringComparison.Ordinal));
        var previous = await (await client.PostAsync($"/v1/models/{id}/plans", "y1,y2,applied1,applied2,prev1,prev2\n-20,-20,60,60,60,60\n", "text/csv")).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(previous, e => e.Path == "header" && e.Reason.Contains("'prev1'", StringComparison.Ordinal));

        // Row-level: a partly empty measurement and a short row are that row's errors; the next row is still answered.
        var rows = await client.PostAsync($"/v1/models/{id}/plans", "y1,y2,applied1,applied2\n-20,,60,60\n-20,-20,60\n-20,-20,60,60\n", "text/csv");
        var lines = ReplayAnswer.CsvRecords(await rows.Content.ReadAsStringAsync());
        Assert.Equal(HttpStatusCode.OK, rows.StatusCode);
        Assert.Equal("error", lines[1][^2]);
        Assert.Contains("measurement[1]: column 'y2' is empty", lines[1][^1], StringComparison.Ordinal);
        Assert.Equal("error", lines[2][^2]);
        Assert.Contains("has 3 fields; the header has 4", lines[2][^1], StringComparison.Ordinal);
        Assert.Equal("optimal", lines[3][^2]);
        Assert.Contains("estimate-initialised", lines[3][^1], StringComparison.Ordinal);
    }

    [Fact]
    public async Task Disturbance_columns_of_a_plain_csv_replay_equal_plan_with_that_disturbance()
    {
        var (client, id, factory) = await StartAsync(Model);
        await using var _ = factory;
        const string Csv = """
            zone_a,zone_b,r1,r2,prev_chiller_a,prev_chiller_b,v_outdoor
            -19.5,-20.3,-21,-19.5,55,65,25
            -19.5,-20.3,-21,-19.5,55,65,
            -19.5,-20.3,-21,-19.5,55,65,5
            """;

        var lines = ReplayAnswer.CsvRecords(await (await client.PostAsync($"/v1/models/{id}/plans", Csv, "text/csv")).Content.ReadAsStringAsync());
        Assert.Equal(["chiller_a", "chiller_b", "cost", "status", "message"], lines[0]);
        string[] disturbances = ["[25]", "null", "[5]"];
        for (int i = 0; i < disturbances.Length; i++)
        {
            var plan = await (await client.PostJsonAsync($"/v1/models/{id}/plan", $$"""{"state":[-19.5,-20.3],"reference":[-21,-19.5],"previousInput":[55,65],"disturbance":{{disturbances[i]}}}""")).ReadJsonAsync();
            AssertClose(plan["inputs"]!.Matrix()[0], [D(lines[i + 1][0]), D(lines[i + 1][1])], 1e-9, $"row {i + 1}");
        }

        // The outdoor temperature moves the plan (otherwise the comparison above would prove nothing).
        Assert.NotEqual(lines[1][0], lines[3][0]);

        // JSON rows take "disturbance" through the shared plan parser.
        var ndjson = await client.PostAsync($"/v1/models/{id}/plans", "{\"state\":[-19.5,-20.3],\"reference\":[-21,-19.5],\"previousInput\":[55,65],\"disturbance\":[25]}\n", "application/x-ndjson");
        var row = Assert.Single(ReplayAnswer.NdjsonResults(await ndjson.Content.ReadAsStringAsync()));
        AssertClose([D(lines[1][0]), D(lines[1][1])], row["firstMove"]!.Doubles(), 1e-9, "ndjson");
    }

    [Fact]
    public async Task Disturbance_columns_on_a_model_without_measured_disturbances_are_passed_through()
    {
        var (client, id, factory) = await StartAsync(TestModels.TwoTanks);
        await using var _ = factory;

        var lines = ReplayAnswer.CsvRecords(await (await client.PostAsync($"/v1/models/{id}/plans", "level_1,level_2,v1\n0.5,-0.2,7\n", "text/csv")).Content.ReadAsStringAsync());

        Assert.Equal(["v1", "valve_1", "valve_2", "cost", "status", "message"], lines[0]);
        Assert.Equal("7", lines[1][0]);
        Assert.Equal("optimal", lines[1][4]);
    }

    private static JsonArray Array(double[] values) => new(values.Select(v => (JsonNode)v).ToArray());

    private static string F(double value) => value.ToString("R", CultureInfo.InvariantCulture);

    private static double D(string text) => double.Parse(text, NumberStyles.Float, CultureInfo.InvariantCulture);

    private static void AssertClose(IReadOnlyList<double> expected, IReadOnlyList<double> actual, double tolerance, string what)
    {
        Assert.Equal(expected.Count, actual.Count);
        for (int i = 0; i < expected.Count; i++)
        {
            Assert.True(Math.Abs(expected[i] - actual[i]) <= tolerance * Math.Max(1, Math.Abs(expected[i])), $"{what} [{i}]: {expected[i]:R} vs {actual[i]:R}");
        }
    }

    private sealed class History
    {
        public List<double[]> Applied { get; } = [];

        public List<double[]?> Measured { get; } = [];

        public List<double> Outdoor { get; } = [];

        public List<double[]?> Reference { get; } = [];

        public int Count => Applied.Count;

        public void Add(double[] applied, double[]? measured, double outdoor, double[]? reference)
        {
            Applied.Add(applied);
            Measured.Add(measured);
            Outdoor.Add(outdoor);
            Reference.Add(reference);
        }
    }
}
