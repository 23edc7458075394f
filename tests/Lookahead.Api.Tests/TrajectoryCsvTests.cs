using System.Globalization;
using System.Net;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// ?format=csv on plan (by id and by alias) and simulate: one row per sample named from the model's labels, the same
/// numbers the JSON answer carries, empty cells where a move or setpoint has no row, and the format declared in OpenAPI.
/// </summary>
public class TrajectoryCsvTests
{
    private const string DemoPlan = """
        {"state":[-17.5,-18.5,-19.5],"previousInput":[30,30,0],"disturbance":[[18],[20]],
         "reference":[[-20,-20,-20],[-20,-20,-20],[-20.5,-20.5,-21]]}
        """;

    [Fact]
    public async Task A_plan_as_csv_has_a_row_per_sample_with_the_json_answers_numbers_and_each_stages_setpoint()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await DemoIdAsync(client);

        var json = await (await client.PostJsonAsync($"/v1/models/{id}/plan", DemoPlan)).ReadJsonAsync();
        var response = await client.PostJsonAsync($"/v1/models/{id}/plan?format=csv", DemoPlan);

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("text/csv", response.Content.Headers.ContentType!.MediaType);
        var records = CsvText.Records(await response.Content.ReadAsStringAsync());
        Assert.Equal(
            ["step", "time_s", "y_zone_a", "y_zone_b", "y_zone_c", "r_zone_a", "r_zone_b", "r_zone_c", "u_chiller_1", "u_chiller_2", "u_door_fan",
             "x_zone_a_temp", "x_zone_b_temp", "x_zone_c_temp", "status", "warnings"],
            records[0]);
        Assert.Equal(31 + 1, records.Count);
        var table = Table(records);
        for (int k = 0; k <= 30; k++)
        {
            Assert.Equal(k, table[k]["step"]);
            Assert.Equal(60.0 * k, table[k]["time_s"]);
            Assert.Equal("optimal", records[k + 1][^2]);
            Assert.Equal(string.Join(' ', json["warnings"]!.AsArray().Select(w => w!["code"]!.GetValue<string>())), records[k + 1][^1]);
            AssertClose(json["outputs"]![k]!, table[k], "y_zone_a", "y_zone_b", "y_zone_c");
            AssertClose(json["states"]![k]!, table[k], "x_zone_a_temp", "x_zone_b_temp", "x_zone_c_temp");
            if (k < 30)
            {
                AssertClose(json["inputs"]![k]!, table[k], "u_chiller_1", "u_chiller_2", "u_door_fan");
            }
        }

        // The schedule's rows, the last one held to the end of the horizon; moves and setpoints have no row N.
        Assert.Equal(-20.0, table[1]["r_zone_c"]);
        Assert.Equal(-21.0, table[2]["r_zone_c"]);
        Assert.Equal(-21.0, table[29]["r_zone_c"]);
        Assert.Equal(-20.5, table[29]["r_zone_a"]);
        Assert.False(table[30].ContainsKey("r_zone_a"));
        Assert.False(table[30].ContainsKey("u_chiller_1"));
    }

    [Fact]
    public async Task A_plan_and_a_run_that_are_not_clean_optima_say_so_on_every_csv_row_with_the_json_answers_warning_codes()
    {
        // Three solver iterations are too few for the demo's limited plans: each stops early, flagged.
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Planning:MaxSolverIterations"] = "3" });
        var client = factory.CreateClient();
        string id = await DemoIdAsync(client);

        const string run = """{"initialState":[-17.5,-18.5,-19.5],"previousInput":[30,30,0],"steps":5,"references":[{"fromStep":0,"reference":[-20,-20,-21]}]}""";
        foreach (var (path, body, code) in new[] { ($"/v1/models/{id}/plan", DemoPlan, "iteration-limit"), ($"/v1/models/{id}/simulate", run, "steps-not-optimal") })
        {
            var json = await (await client.PostJsonAsync(path, body)).ReadJsonAsync();
            var codes = json["warnings"]!.AsArray().Select(w => w!["code"]!.GetValue<string>()).ToList();
            Assert.Contains(code, codes);

            var records = CsvText.Records(await (await client.PostJsonAsync(path + "?format=csv", body)).Content.ReadAsStringAsync());
            Assert.Equal("warnings", records[0][^1]);
            Assert.All(records.Skip(1), row => Assert.Equal(string.Join(' ', codes), row[^1]));
        }
    }

    [Fact]
    public async Task A_plan_through_an_alias_as_csv_equals_the_plan_by_id()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await DemoIdAsync(client);

        string byId = await (await client.PostJsonAsync($"/v1/models/{id}/plan?format=csv", DemoPlan)).Content.ReadAsStringAsync();
        var byAlias = await client.PostJsonAsync("/v1/aliases/cold-store-demo/plan?format=csv", DemoPlan);

        Assert.Equal(HttpStatusCode.OK, byAlias.StatusCode);
        Assert.Equal("text/csv", byAlias.Content.Headers.ContentType!.MediaType);
        Assert.Equal(byId, await byAlias.Content.ReadAsStringAsync());
    }

    [Fact]
    public async Task A_simulation_as_csv_carries_truth_measurements_and_estimates_per_sample()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await DemoIdAsync(client);
        const string run = """
            {"initialState":[-20,-20,-20],"previousInput":[0,0,0],"steps":12,"feedback":"estimate",
             "references":[{"fromStep":0,"reference":[-20,-20,-20]},{"fromStep":6,"reference":[-20.5,-20,-20]}],
             "outputDisturbance":[{"fromStep":3,"offset":[0.6,0.5,0.5]}],
             "measurementNoise":{"standardDeviation":[0.02,0.02,0.02],"seed":4}}
            """;

        var json = await (await client.PostJsonAsync($"/v1/models/{id}/simulate", run)).ReadJsonAsync();
        var response = await client.PostJsonAsync($"/v1/models/{id}/simulate?format=csv", run);

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("text/csv", response.Content.Headers.ContentType!.MediaType);
        var records = CsvText.Records(await response.Content.ReadAsStringAsync());
        string[] outputs = ["zone_a", "zone_b", "zone_c"];
        string[] states = ["zone_a_temp", "zone_b_temp", "zone_c_temp"];
        Assert.Equal(
            [
                "step", "time_s", .. outputs.Select(o => "y_" + o), .. outputs.Select(o => "r_" + o), "u_chiller_1", "u_chiller_2", "u_door_fan",
                .. outputs.Select(o => "ym_" + o), .. outputs.Select(o => "yhat_" + o), .. states.Select(s => "x_" + s), .. states.Select(s => "xhat_" + s),
                "dhat1", "dhat2", "dhat3", "warnings",
            ],
            records[0]);
        Assert.Equal(13 + 1, records.Count);
        var table = Table(records);
        for (int k = 0; k <= 12; k++)
        {
            AssertClose(json["outputs"]![k]!, table[k], [.. outputs.Select(o => "y_" + o)]);
            AssertClose(json["measurements"]![k]!, table[k], [.. outputs.Select(o => "ym_" + o)]);
            AssertClose(json["estimatedOutputs"]![k]!, table[k], [.. outputs.Select(o => "yhat_" + o)]);
            AssertClose(json["estimates"]![k]!, table[k], [.. states.Select(s => "xhat_" + s)]);
            AssertClose(json["disturbanceEstimates"]![k]!, table[k], "dhat1", "dhat2", "dhat3");
            if (k < 12)
            {
                AssertClose(json["inputs"]![k]!, table[k], "u_chiller_1", "u_chiller_2", "u_door_fan");
                Assert.Equal(k < 6 ? -20.0 : -20.5, table[k]["r_zone_a"]);
            }
        }

        Assert.False(table[12].ContainsKey("u_door_fan"));
    }

    [Fact]
    public async Task Without_labels_the_columns_are_numbered_and_a_run_without_setpoints_or_estimator_has_none_of_those_columns()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var plan = CsvText.Records(await (await client.PostJsonAsync($"/v1/models/{id}/plan?format=csv", """{"state":[1,0]}""")).Content.ReadAsStringAsync());
        var run = CsvText.Records(await (await client.PostJsonAsync($"/v1/models/{id}/simulate?format=csv", """{"initialState":[1,0],"steps":5}""")).Content.ReadAsStringAsync());

        Assert.Equal(["step", "time_s", "y1", "y2", "u1", "x1", "x2", "status", "warnings"], plan[0]);
        Assert.Equal(["step", "time_s", "y1", "y2", "u1", "ym1", "ym2", "x1", "x2", "warnings"], run[0]);
        Assert.Equal(6 + 1, run.Count);
    }

    [Fact]
    public async Task An_unknown_format_is_refused_naming_the_parameter_and_the_three_formats()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await DemoIdAsync(client);

        var errors = await (await client.PostJsonAsync($"/v1/models/{id}/plan?format=xlsx", DemoPlan)).ReadProblemAsync(HttpStatusCode.BadRequest);

        var error = Assert.Single(errors);
        Assert.Equal("format", error.Path);
        Assert.Contains("'csv'", error.Reason, StringComparison.Ordinal);
    }

    [Fact]
    public async Task The_openapi_document_declares_text_csv_for_plans_alias_plans_and_simulations()
    {
        await using var factory = new LookaheadFactory();
        var document = await (await factory.CreateClient().GetAsync("/swagger/v1/swagger.json")).ReadJsonAsync();

        foreach (string path in new[] { "/v1/models/{id}/plan", "/v1/aliases/{name}/plan", "/v1/models/{id}/simulate" })
        {
            var content = document["paths"]![path]!["post"]!["responses"]!["200"]!["content"]!.AsObject();
            Assert.True(content.ContainsKey("text/csv"), $"{path} does not declare text/csv");
            Assert.True(content.ContainsKey("application/json"), $"{path} lost its JSON answer");
        }
    }

    private static async Task<string> DemoIdAsync(HttpClient client) =>
        (await (await client.GetAsync("/v1/aliases/cold-store-demo")).ReadJsonAsync())["modelId"]!.GetValue<string>();

    /// <summary>Data rows as column → number, leaving out empty cells and the status and warnings text.</summary>
    private static List<Dictionary<string, double>> Table(List<List<string>> records) =>
        records.Skip(1).Select(row => records[0].Zip(row)
            .Where(cell => cell.First is not ("status" or "warnings") && cell.Second.Length > 0)
            .ToDictionary(cell => cell.First, cell => double.Parse(cell.Second, NumberStyles.Float, CultureInfo.InvariantCulture))).ToList();

    /// <summary>The JSON answer carries 15 significant digits, the CSV round-trip digits.</summary>
    private static void AssertClose(JsonNode jsonRow, Dictionary<string, double> row, params string[] columns)
    {
        for (int j = 0; j < columns.Length; j++)
        {
            double expected = jsonRow[j]!.GetValue<double>();
            double actual = row[columns[j]];
            Assert.True(Math.Abs(actual - expected) <= 1e-13 * Math.Max(1, Math.Abs(expected)), $"{columns[j]}: csv {actual}, json {expected}");
        }
    }
}
