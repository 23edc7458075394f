using System.Globalization;
using System.Net;
using System.Runtime.CompilerServices;
using System.Text;
using Lookahead.Client.Tests.Support;
using Xunit;

namespace Lookahead.Client.Tests;

/// <summary>Streaming replay through the client: NDJSON from rows as they are made, from a file, CSV, refusals and cut answers.</summary>
public class ReplayTests
{
    private const int HundredThousand = 100_000;

    [Fact]
    public async Task A_hundred_thousand_rows_stream_both_ways_and_each_equals_its_single_plan()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();
        string demo = await Demo.IdAsync(client);
        long produced = 0;

        async IAsyncEnumerable<ReplayRowRequest> Rows([EnumeratorCancellation] CancellationToken token = default)
        {
            for (long i = 1; i <= HundredThousand; i++)
            {
                token.ThrowIfCancellationRequested();
                Interlocked.Increment(ref produced);
                yield return HistorianRows.Replay(i);
                if (i % 4096 == 0)
                {
                    // Let the answers interleave with the upload, as a slow historian export would.
                    await Task.Yield();
                }
            }
        }

        var replay = client.ReplayAsync(demo, Rows());
        long expected = 1;
        long producedAtFirstAnswer = -1;
        int notOptimal = 0;
        var samples = new Dictionary<long, double[]>();
        await foreach (var row in replay)
        {
            if (producedAtFirstAnswer < 0)
            {
                producedAtFirstAnswer = Interlocked.Read(ref produced);
            }

            Assert.Equal(expected++, row.Row);
            Assert.NotEqual("error", row.Status);
            Assert.Equal(3, row.FirstMove!.Length);
            notOptimal += row.Status == "optimal" ? 0 : 1;
            if (row.Row is 1 or 777 or 50_000 or HundredThousand)
            {
                samples[row.Row] = row.FirstMove;
            }
        }

        Assert.Equal(HundredThousand + 1, expected);
        Assert.Equal(new ReplaySummary(HundredThousand, 0, true, null), replay.Summary);
        Assert.Equal(0, notOptimal);

        // The first answers came back while most rows were still to be made: neither side was buffered whole.
        Assert.InRange(producedAtFirstAnswer, 1, HundredThousand / 2);

        foreach (var (row, move) in samples)
        {
            var single = await client.PlanAsync(demo, HistorianRows.Plan(row));
            for (int j = 0; j < 3; j++)
            {
                Assert.Equal(single.FirstMove[j], move[j], 6);
            }
        }
    }

    [Fact]
    public async Task An_ndjson_file_replays_with_full_detail_and_a_bad_row_is_an_error_row()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();
        string demo = await Demo.IdAsync(client);
        string path = Path.Combine(Path.GetTempPath(), $"lookahead-replay-{Guid.NewGuid():N}.ndjson");
        await File.WriteAllLinesAsync(path,
        [
            """{"state":[-19.5,-19.8,-20.1],"previousInput":[30,30,0]}""",
            """{"state":[-19.5,-19.8]}""",
            """{"state":[-19.4,-19.7,-20.0],"previousInput":[30,30,0]}""",
        ]);
        try
        {
            var replay = client.ReplayNdjsonFileAsync(demo, path, ReplayDetail.Full);
            var rows = new List<ReplayRowResult>();
            await foreach (var row in replay)
            {
                rows.Add(row);
            }

            Assert.Equal([1L, 2L, 3L], rows.Select(r => r.Row));
            Assert.Equal(30, rows[0].Inputs!.Length);
            Assert.Equal("error", rows[1].Status);
            Assert.Contains(rows[1].Errors!, e => e.Path.Contains("state", StringComparison.Ordinal));
            Assert.Equal(new ReplaySummary(3, 1, true, null), replay.Summary);
        }
        finally
        {
            File.Delete(path);
        }
    }

    [Fact]
    public async Task A_csv_replay_passes_columns_through_and_reads_the_summary_record()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();
        string demo = await Demo.IdAsync(client);
        const string csv = """
            timestamp,zone_a_temp,zone_b_temp,zone_c_temp,prev_chiller_1,prev_chiller_2,prev_door_fan
            2026-12-01T06:00:00Z,-17.5,-18.5,-19.5,30,30,0
            2026-12-01T06:01:00Z,-17.7,-18.6,-19.5,50,50,0
            """;
        using var body = new MemoryStream(Encoding.UTF8.GetBytes(csv));

        var replay = client.ReplayCsvAsync(demo, body);
        var rows = new List<CsvReplayRecord>();
        await foreach (var row in replay)
        {
            rows.Add(row);
        }

        Assert.Equal(2, rows.Count);
        Assert.Equal(["timestamp", "chiller_1", "chiller_2", "door_fan", "cost", "status", "message"], rows[0].Header);
        Assert.Equal("2026-12-01T06:01:00Z", rows[1]["timestamp"]);
        Assert.Equal("optimal", rows[0].Status);
        var single = await client.PlanAsync(demo, new PlanRequest { State = [-17.5, -18.5, -19.5], PreviousInput = [30, 30, 0] });
        Assert.Equal(single.FirstMove[0], double.Parse(rows[0]["chiller_1"]!, CultureInfo.InvariantCulture), 9);
        Assert.Equal(new ReplaySummary(2, 0, true, null), replay.Summary);

        // The caller's stream stays open.
        Assert.True(body.CanRead);
    }

    [Fact]
    public async Task A_header_without_state_columns_is_thrown_as_a_problem_before_any_row()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();
        string demo = await Demo.IdAsync(client);
        using var body = new MemoryStream(Encoding.UTF8.GetBytes("timestamp,zone_a_temp\n2026-12-01T06:00:00Z,-17.5\n"));

        var problem = await Assert.ThrowsAsync<LookaheadProblemException>(async () =>
        {
            await foreach (var unused in client.ReplayCsvAsync(demo, body))
            {
            }
        });
        Assert.Equal(HttpStatusCode.BadRequest, problem.Status);
        Assert.NotEmpty(problem.Errors);
    }

    [Fact]
    public async Task An_answer_that_ends_without_its_summary_is_reported_as_cut()
    {
        // A proxy that loses the connection mid-answer: two results, then nothing.
        using var http = new HttpClient(new CutAnswer()) { BaseAddress = new Uri("http://service.test/") };
        using var client = new LookaheadClient(http);

        var replay = client.ReplayAsync(new string('a', 64), Single());
        int read = 0;
        var cut = await Assert.ThrowsAsync<ReplayCutException>(async () =>
        {
            await foreach (var unused in replay)
            {
                read++;
            }
        });
        Assert.Equal(2, read);
        Assert.Equal(2, cut.ResultsRead);
        Assert.Null(replay.Summary);
    }

    private static async IAsyncEnumerable<ReplayRowRequest> Single()
    {
        await Task.Yield();
        yield return HistorianRows.Replay(1);
    }

    private sealed class CutAnswer : HttpMessageHandler
    {
        protected override Task<HttpResponseMessage> SendAsync(HttpRequestMessage request, CancellationToken cancellationToken) =>
            Task.FromResult(new HttpResponseMessage(HttpStatusCode.OK)
            {
                Content = new StringContent(
                    """
                    {"row":1,"status":"optimal","firstMove":[1,2,3],"cost":1}
                    {"row":2,"status":"optimal","firstMove":[1,2,3],"cost":1}

                    """,
                    Encoding.UTF8,
                    "application/x-ndjson"),
            });
    }
}
