using System.Net;
using System.Text;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>Every replay that ran to the end of its upload says so last: rows, failed rows, complete.</summary>
public class ReplaySummaryTests
{
    private const int Rows = 10;
    private const int BadRow = 7;

    private static async Task<(HttpClient Client, string Id, LookaheadFactory Factory)> StartAsync()
    {
        var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Replay:BatchSize"] = "4" });
        var client = factory.CreateClient();
        return (client, await client.RegisterAsync(TestModels.DoubleIntegrator), factory);
    }

    [Fact]
    public async Task Ndjson_ends_with_a_summary_line_after_the_last_result()
    {
        var (client, id, factory) = await StartAsync();
        await using var _ = factory;
        var body = new StringBuilder();
        for (int i = 1; i <= Rows; i++)
        {
            body.Append(i == BadRow ? """{"state":[1]}""" : FormattableString.Invariant($$"""{"state":[{{i * 0.1}},0]}""")).Append('\n');
        }

        var response = await client.PostAsync($"/v1/models/{id}/plans", body.ToString(), "application/x-ndjson");
        var lines = (await response.Content.ReadAsStringAsync()).Split('\n', StringSplitOptions.RemoveEmptyEntries).Select(l => JsonNode.Parse(l)!).ToList();

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal(Rows + 1, lines.Count);
        Assert.All(lines.Take(Rows), l => Assert.NotNull(l["row"]));
        var summary = lines[^1].AsObject();
        Assert.Equal(["summary"], summary.Select(p => p.Key));
        Assert.Equal(new ReplaySummaryRead(Rows, 1, true, null), ReplaySummaryRead.FromJson(summary["summary"]!));
    }

    [Fact]
    public async Task Csv_ends_with_a_summary_record_as_wide_as_the_header()
    {
        var (client, id, factory) = await StartAsync();
        await using var _ = factory;
        var body = new StringBuilder("time,x1,x2\n");
        for (int i = 1; i <= Rows; i++)
        {
            body.Append(i == BadRow ? $"{i},oops,0\n" : FormattableString.Invariant($"{i},{i * 0.1},0\n"));
        }

        var response = await client.PostAsync($"/v1/models/{id}/plans", body.ToString(), "text/csv");
        var records = CsvText.Records(await response.Content.ReadAsStringAsync());

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal(["time", "u1", "cost", "status", "message"], records[0]);
        Assert.Equal(Rows + 2, records.Count);
        Assert.Equal(records[0].Count, records[^1].Count);
        Assert.Equal(["#summary", $"rows={Rows}", "failedRows=1", "complete=true", ""], records[^1]);
        Assert.Equal(new ReplaySummaryRead(Rows, 1, true, null), ReplaySummaryRead.FromCsv(records[^1]));
    }

    [Fact]
    public async Task Json_totals_say_the_replay_is_complete()
    {
        var (client, id, factory) = await StartAsync();
        await using var _ = factory;
        var requests = new JsonArray();
        for (int i = 1; i <= Rows; i++)
        {
            requests.Add(i == BadRow ? JsonNode.Parse("""{"state":[1]}""") : JsonNode.Parse(FormattableString.Invariant($$"""{"state":[{{i * 0.1}},0]}""")));
        }

        var response = await client.PostJsonAsync($"/v1/models/{id}/plans", new JsonObject { ["requests"] = requests }.ToJsonString());
        var answer = await response.ReadJsonAsync();

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal(Rows, answer["results"]!.AsArray().Count);
        Assert.Equal(new ReplaySummaryRead(Rows, 1, true, null), ReplaySummaryRead.FromJson(answer));
        Assert.Null(answer["reason"]);
    }
}
