using System.Diagnostics;
using System.Globalization;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// Runs the built service as a real process: SIGTERM during a replay whose upload never ends cuts the replay at once,
/// the answer ends with a summary saying so, and the service exits cleanly inside its shutdown grace.
/// </summary>
public class ReplayShutdownTests
{
    private const int GraceSeconds = 15;

    // Enough rows answered that the replay is surely streaming when the signal comes.
    private const int RowsBeforeSignal = 200;

    [Theory]
    [InlineData("ndjson")]
    [InlineData("csv")]
    [InlineData("json")]
    public async Task Sigterm_ends_a_running_replay_with_a_cut_summary_and_the_service_exits_within_the_grace(string format)
    {
        await using var store = ServiceStore.Sqlite();
        using var service = await ServiceProcess.StartAsync(store, new Dictionary<string, string>
        {
            ["Replay:BatchSize"] = "16",
            ["Shutdown:GraceSeconds"] = GraceSeconds.ToString(CultureInfo.InvariantCulture),
        });
        string id;
        using (var client = service.CreateClient())
        {
            id = await client.RegisterAsync(TestModels.DoubleIntegrator);
        }

        var (contentType, head, row) = Upload(format);
        await using var upload = await EndlessUpload.StartAsync(service.Address, $"/v1/models/{id}/plans", contentType, head, row);
        await upload.WaitForBodyAsync(body => ResultRows(format, body) >= RowsBeforeSignal, TimeSpan.FromSeconds(30));

        var clock = Stopwatch.StartNew();
        service.Terminate();
        var answer = await upload.ReadToEndAsync(TimeSpan.FromSeconds(GraceSeconds + 10));
        int? exit = await service.WaitForExitAsync(TimeSpan.FromSeconds(GraceSeconds + 10));
        clock.Stop();

        Assert.StartsWith("HTTP/1.1 200", answer.Head, StringComparison.Ordinal);
        Assert.True(answer.Ended, $"the answer broke off without its chunked end:\n{answer.Body[Math.Max(0, answer.Body.Length - 500)..]}");
        var summary = Summary(format, answer.Body);
        Assert.False(summary.Complete);
        Assert.True(summary.Rows >= RowsBeforeSignal, $"summary counts {summary.Rows} rows");
        Assert.Equal(ResultRows(format, answer.Body), summary.Rows);
        Assert.Equal(0, summary.FailedRows);
        if (format != "csv")
        {
            Assert.Equal("shutdown", summary.Reason);
        }

        Assert.True(exit is not null, $"the service still ran {GraceSeconds + 10} s after SIGTERM; its last output:\n{service.OutputTail}");
        Assert.Equal(0, exit);

        // The replay ends when the stop begins, not when the grace runs out.
        Assert.True(clock.Elapsed < TimeSpan.FromSeconds(GraceSeconds), $"the service took {clock.Elapsed.TotalSeconds:F1} s to stop; the grace is {GraceSeconds} s");
    }

    private static (string ContentType, string Head, Func<long, string> Row) Upload(string format) => format switch
    {
        "ndjson" => ("application/x-ndjson", "", i => State(i) + "\n"),
        "csv" => ("text/csv", "tag,x1,x2\n", i => FormattableString.Invariant($"s{i},{Position(i)},0\n")),
        _ => ("application/json", """{"requests":[""", i => (i == 0 ? "" : ",") + State(i)),
    };

    private static string State(long i) => FormattableString.Invariant($$"""{"state":[{{Position(i)}},0]}""");

    private static double Position(long i) => (i % 100) * 0.01;

    /// <summary>Result rows in the body so far (the summary excluded).</summary>
    private static long ResultRows(string format, string body) => format switch
    {
        "ndjson" => body.Split('\n').Count(l => l.StartsWith("{\"row\"", StringComparison.Ordinal)),
        "csv" => body.Split('\n').Count(l => l.StartsWith('s')),
        _ => CountOccurrences(body, "{\"row\":"),
    };

    private static long CountOccurrences(string text, string part)
    {
        long count = 0;
        for (int at = text.IndexOf(part, StringComparison.Ordinal); at >= 0; at = text.IndexOf(part, at + part.Length, StringComparison.Ordinal))
        {
            count++;
        }

        return count;
    }

    private static ReplaySummaryRead Summary(string format, string body)
    {
        switch (format)
        {
            case "ndjson":
            {
                var last = JsonNode.Parse(body.TrimEnd('\n').Split('\n')[^1])!["summary"]!;
                return ReplaySummaryRead.FromJson(last);
            }

            case "csv":
            {
                var last = CsvText.Records(body)[^1];
                return ReplaySummaryRead.FromCsv(last);
            }

            default:
                return ReplaySummaryRead.FromJson(JsonNode.Parse(body)!);
        }
    }
}
