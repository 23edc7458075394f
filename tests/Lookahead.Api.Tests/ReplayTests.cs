using System.Net;
using System.Text;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

public class ReplayTests
{
    private static async Task<(HttpClient Client, string Id, LookaheadFactory Factory)> StartAsync(string model, IDictionary<string, string?>? settings = null)
    {
        var factory = new LookaheadFactory(settings ?? new Dictionary<string, string?> { ["Replay:BatchSize"] = "4" });
        var client = factory.CreateClient();
        return (client, await client.RegisterAsync(model), factory);
    }

    private static async Task<double[]> SingleFirstMoveAsync(HttpClient client, string id, string request)
    {
        var plan = await (await client.PostJsonAsync($"/v1/models/{id}/plan", request)).ReadJsonAsync();
        return plan["inputs"]!.Matrix()[0];
    }

    [Fact]
    public async Task Ndjson_replay_answers_line_by_line_in_order_and_a_bad_line_gets_its_own_error()
    {
        var (client, id, factory) = await StartAsync(TestModels.DoubleIntegrator);
        await using var _ = factory;
        var lines = new StringBuilder();
        for (int i = 0; i < 10; i++)
        {
            lines.Append(i == 6 ? """{"state":[1,2,3]}""" : $$"""{"state":[{{i * 0.1}},0]}""").Append('\n');
        }

        var response = await client.PostAsync($"/v1/models/{id}/plans", lines.ToString(), "application/x-ndjson");
        var results = ReplayAnswer.NdjsonResults(await response.Content.ReadAsStringAsync());

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("application/x-ndjson", response.Content.Headers.ContentType?.MediaType);
        Assert.Equal(10, results.Count);
        Assert.Equal(Enumerable.Range(1, 10).Select(i => (long)i), results.Select(r => r["row"]!.GetValue<long>()));
        Assert.Equal("error", results[6]["status"]!.GetValue<string>());
        Assert.Equal("state", results[6]["errors"]![0]!["path"]!.GetValue<string>());
        Assert.All(results.Where((_, i) => i != 6), r => Assert.Equal("optimal", r["status"]!.GetValue<string>()));
        AssertClose(await SingleFirstMoveAsync(client, id, """{"state":[0.5,0]}"""), results[5]["firstMove"]!.Doubles());
    }

    [Fact]
    public async Task Ndjson_rows_are_numbered_by_line_even_across_blank_lines_and_broken_json()
    {
        var (client, id, factory) = await StartAsync(TestModels.DoubleIntegrator);
        await using var _ = factory;

        var response = await client.PostAsync($"/v1/models/{id}/plans?detail=full", "{\"state\":[1,0]}\r\n\n{not json\n{\"state\":[0,1]}", "application/x-ndjson");
        var results = ReplayAnswer.NdjsonResults(await response.Content.ReadAsStringAsync());

        Assert.Equal([1L, 3L, 4L], results.Select(r => r["row"]!.GetValue<long>()));
        Assert.Equal("error", results[1]["status"]!.GetValue<string>());
        Assert.Equal(11, results[2]["states"]!.AsArray().Count);
        Assert.Equal(10, results[2]["inputs"]!.AsArray().Count);
    }

    [Fact]
    public async Task Json_replay_streams_results_in_order_with_per_row_errors_and_totals()
    {
        var (client, id, factory) = await StartAsync(TestModels.DoubleIntegrator);
        await using var _ = factory;
        var requests = new JsonArray();
        for (int i = 0; i < 9; i++)
        {
            requests.Add(i == 4 ? JsonNode.Parse("""{"state":[1],"extra":true}""") : JsonNode.Parse($$"""{"state":[{{i}},0]}"""));
        }

        requests.Add(JsonValue.Create(42));
        var body = new JsonObject { ["detail"] = "first-move", ["requests"] = requests };

        var result = await (await client.PostJsonAsync($"/v1/models/{id}/plans", body)).ReadJsonAsync();
        var rows = result["results"]!.AsArray();

        Assert.Equal(id, result["modelId"]!.GetValue<string>());
        Assert.Equal(10, rows.Count);
        Assert.Equal(10, result["rows"]!.GetValue<long>());
        Assert.Equal(2, result["failedRows"]!.GetValue<long>());
        Assert.Equal(Enumerable.Range(1, 10).Select(i => (long)i), rows.Select(r => r!["row"]!.GetValue<long>()));
        var errors = rows[4]!["errors"]!.AsArray().Select(e => e!["path"]!.GetValue<string>()).ToList();
        Assert.Contains("requests[4].state", errors);
        Assert.Contains("requests[4].extra", errors);
        Assert.Equal("error", rows[9]!["status"]!.GetValue<string>());
        AssertClose(await SingleFirstMoveAsync(client, id, """{"state":[3,0]}"""), rows[3]!["firstMove"]!.Doubles());
    }

    [Fact]
    public async Task Json_replay_detail_after_requests_is_reported_and_the_query_detail_applies()
    {
        var (client, id, factory) = await StartAsync(TestModels.DoubleIntegrator);
        await using var _ = factory;

        var late = await (await client.PostJsonAsync($"/v1/models/{id}/plans", """{"requests":[{"state":[1,0]}],"detail":"full"}""")).ReadJsonAsync();
        var query = await (await client.PostJsonAsync($"/v1/models/{id}/plans?detail=full", """{"requests":[{"state":[1,0]}]}""")).ReadJsonAsync();

        Assert.Equal("first-move", late["detail"]!.GetValue<string>());
        Assert.Contains(late["warnings"]!.AsArray(), w => w!["code"]!.GetValue<string>() == "detail-after-requests" && w["message"]!.GetValue<string>().Contains("'detail' came after 'requests'", StringComparison.Ordinal));
        Assert.Equal("full", query["detail"]!.GetValue<string>());
        Assert.Equal(10, query["results"]![0]!["inputs"]!.AsArray().Count);
    }

    [Fact]
    public async Task Json_replay_without_requests_or_with_a_broken_start_is_a_400()
    {
        var (client, id, factory) = await StartAsync(TestModels.DoubleIntegrator);
        await using var _ = factory;

        var missing = await (await client.PostJsonAsync($"/v1/models/{id}/plans", """{"detail":"full"}""")).ReadProblemAsync(HttpStatusCode.BadRequest);
        var unknown = await (await client.PostJsonAsync($"/v1/models/{id}/plans", """{"rows":[]}""")).ReadProblemAsync(HttpStatusCode.BadRequest);
        await (await client.PostJsonAsync($"/v1/models/{id}/plans", """[1,2]""")).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.Contains(missing, e => e.Path == "requests");
        Assert.Contains(unknown, e => e.Path == "rows");
    }

    [Fact]
    public async Task Csv_replay_keeps_pass_through_columns_names_moves_by_label_and_flags_a_bad_row()
    {
        var (client, id, factory) = await StartAsync(TestModels.TwoTanks);
        await using var _ = factory;
        const string Csv = """
            timestamp,level_1,x2,r_h1,r2,tag
            2025-01-01T00:00:00Z,0.5,-0.2,1,0.5,"pump A, north"
            2025-01-01T00:00:05Z,oops,-0.2,1,0.5,B
            2025-01-01T00:00:10Z,0.5,-0.2,,,C
            2025-01-01T00:00:15Z,0.5,-0.2,1,0.5,D
            2025-01-01T00:00:20Z,0.1,0.1,1,,E
            """;

        var response = await client.PostAsync($"/v1/models/{id}/plans", Csv, "text/csv");
        var lines = ReplayAnswer.CsvLines(await response.Content.ReadAsStringAsync());

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("text/csv", response.Content.Headers.ContentType?.MediaType);
        Assert.Equal("timestamp,tag,valve_1,valve_2,cost,status,message", lines[0]);
        Assert.Equal(6, lines.Length);
        Assert.StartsWith("2025-01-01T00:00:00Z,\"pump A, north\",", lines[1], StringComparison.Ordinal);
        Assert.EndsWith(",optimal,", lines[1], StringComparison.Ordinal);
        Assert.StartsWith("2025-01-01T00:00:05Z,B,,,,error,row 2: state[0]", lines[2], StringComparison.Ordinal);
        Assert.EndsWith(",optimal,", lines[3], StringComparison.Ordinal);
        Assert.Contains("error,row 5: reference[1]", lines[5], StringComparison.Ordinal);
        var expected = await SingleFirstMoveAsync(client, id, """{"state":[0.5,-0.2],"reference":[1,0.5]}""");
        var fields = lines[4].Split(',');
        AssertClose(expected, [double.Parse(fields[2], System.Globalization.CultureInfo.InvariantCulture), double.Parse(fields[3], System.Globalization.CultureInfo.InvariantCulture)]);
    }

    [Fact]
    public async Task Csv_replay_with_a_missing_state_column_is_a_400_before_any_row()
    {
        var (client, id, factory) = await StartAsync(TestModels.TwoTanks);
        await using var _ = factory;

        var response = await client.PostAsync($"/v1/models/{id}/plans", "timestamp,level_1\n1,0.5\n", "text/csv");
        var errors = await response.ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.Contains(errors, e => e.Path == "header" && e.Reason.Contains("level_2", StringComparison.Ordinal));
    }

    [Theory]
    [InlineData("timestamp;level_1;level_2\n1;0,5;-0,2\n", "';'")]
    [InlineData("timestamp\tlevel_1\tlevel_2\n1\t0.5\t-0.2\n", "tab")]
    public async Task Csv_replay_of_another_dialect_is_named_as_such_not_as_missing_columns(string body, string separator)
    {
        var (client, id, factory) = await StartAsync(TestModels.TwoTanks);
        await using var _ = factory;

        var response = await client.PostAsync($"/v1/models/{id}/plans", body, "text/csv");
        var errors = await response.ReadProblemAsync(HttpStatusCode.BadRequest);

        var error = Assert.Single(errors);
        Assert.Equal("header", error.Path);
        Assert.Contains(separator, error.Reason, StringComparison.Ordinal);
        Assert.Contains("comma-separated", error.Reason, StringComparison.Ordinal);
        Assert.DoesNotContain("missing", error.Reason, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Replay_with_another_content_type_is_a_415_and_an_unknown_model_a_404()
    {
        var (client, id, factory) = await StartAsync(TestModels.DoubleIntegrator);
        await using var _ = factory;

        await (await client.PostAsync($"/v1/models/{id}/plans", "x", "text/plain")).ReadProblemAsync(HttpStatusCode.UnsupportedMediaType);
        await (await client.PostAsync($"/v1/models/{new string('1', 64)}/plans", "{\"state\":[1,0]}\n", "application/x-ndjson")).ReadProblemAsync(HttpStatusCode.NotFound);
        await (await client.PostAsync($"/v1/models/{id}/plans?detail=everything", "{\"state\":[1,0]}\n", "application/x-ndjson")).ReadProblemAsync(HttpStatusCode.BadRequest);
    }

    [Fact]
    public async Task Replay_bodies_over_the_replay_limit_are_refused_with_413()
    {
        var (client, id, factory) = await StartAsync(TestModels.DoubleIntegrator, new Dictionary<string, string?> { ["Limits:MaxReplayBodyBytes"] = "2048" });
        await using var _ = factory;
        string body = string.Concat(Enumerable.Repeat("{\"state\":[1,0]}\n", 500));

        await (await client.PostAsync($"/v1/models/{id}/plans", body, "application/x-ndjson")).ReadProblemAsync(HttpStatusCode.RequestEntityTooLarge);
    }

    // Replay's first-move path computes u_0 from the leading gain rows, the plan endpoint from the whole
    // sequence: the same numbers up to rounding (and 15-digit trajectories on the plan endpoint).
    private static void AssertClose(IReadOnlyList<double> expected, IReadOnlyList<double> actual)
    {
        Assert.Equal(expected.Count, actual.Count);
        for (int i = 0; i < expected.Count; i++)
        {
            Assert.True(Math.Abs(expected[i] - actual[i]) <= 1e-12 * Math.Max(1, Math.Abs(expected[i])), $"[{i}] {expected[i]:R} vs {actual[i]:R}");
        }
    }
}
