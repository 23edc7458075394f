using System.IO.Pipelines;
using System.Net;
using System.Text;
using Lookahead.Client.Tests.Support;
using Xunit;

namespace Lookahead.Client.Tests;

/// <summary>
/// 429 and 503 are retried after the Retry-After the answer carries (seconds or an HTTP date), at most MaxAttempts
/// times in all; other refusals are not retried; waits are recorded, never slept, so nothing here is timed.
/// </summary>
public class RetryTests
{
    [Fact]
    public async Task A_plan_refused_by_the_services_solver_slots_is_retried_after_retry_after_once_the_slot_frees()
    {
        await using var service = new ServiceFactory(new Dictionary<string, string?>
        {
            ["RateLimiting:SolverConcurrency"] = "1",
            ["RateLimiting:SolverQueueLimit"] = "0",

            // Two rows fill a batch, so the replay answers its first rows while its upload is still open.
            ["Replay:BatchSize"] = "2",
        });
        var waits = new List<TimeSpan>();
        var upload = new Pipe();
        IAsyncEnumerator<CsvReplayRecord>? replayRows = null;
        var options = new LookaheadClientOptions
        {
            WaitAsync = async (delay, token) =>
            {
                waits.Add(delay);

                // While the client waits, the replay holding the only slot finishes.
                await upload.Writer.CompleteAsync();
                while (await replayRows!.MoveNextAsync())
                {
                }
            },
        };
        using var client = service.CreateLookaheadClient(options);
        string demo = await Demo.IdAsync(client);

        var replay = client.ReplayCsvAsync(demo, upload.Reader.AsStream());
        replayRows = replay.GetAsyncEnumerator();
        string rows = "zone_a_temp,zone_b_temp,zone_c_temp\n" + string.Concat(Enumerable.Repeat("-19.5,-19.8,-20.1\n-19.4,-19.7,-20.0\n", 10));
        await upload.Writer.WriteAsync(Encoding.UTF8.GetBytes(rows));

        // The first answer has arrived, so the replay holds the client's slot from here on.
        Assert.True(await replayRows.MoveNextAsync());

        var plan = await client.PlanAsync(demo, new PlanRequest { State = [-19.5, -19.8, -20.1] });
        Assert.Equal("optimal", plan.Status);
        Assert.NotEmpty(waits);
        Assert.Equal(TimeSpan.FromSeconds(1), waits[0]);
        Assert.True(replay.Summary!.Complete);
        Assert.Equal(20, replay.Summary.Rows);
        await replayRows.DisposeAsync();
    }

    [Fact]
    public async Task Retry_after_as_an_http_date_waits_until_that_date_and_resends_the_body()
    {
        await using var service = new ServiceFactory();
        var now = new DateTimeOffset(2026, 12, 3, 6, 0, 0, TimeSpan.Zero);
        var handler = new ScriptedHandler(
            service.CreateServerHandler(),
            () => ScriptedHandler.Unavailable(now.AddSeconds(7).ToString("r", System.Globalization.CultureInfo.InvariantCulture)),
            () => ScriptedHandler.TooMany("2"));
        var waits = new List<TimeSpan>();
        using var http = new HttpClient(handler) { BaseAddress = service.Server.BaseAddress };
        using var client = new LookaheadClient(http, new LookaheadClientOptions
        {
            TimeProvider = new FixedClock(now),
            WaitAsync = (delay, _) => { waits.Add(delay); return Task.CompletedTask; },
        });

        var model = await client.RegisterModelAsync(Models.DoubleIntegrator());
        Assert.True(model.Created);
        Assert.Equal([TimeSpan.FromSeconds(7), TimeSpan.FromSeconds(2)], waits);
        Assert.Equal(3, handler.Requests);
        Assert.Equal(handler.Bodies[0], handler.Bodies[2]);
        Assert.Contains("\"horizon\":10", handler.Bodies[2], StringComparison.Ordinal);
    }

    [Fact]
    public async Task Attempts_are_bounded_and_the_last_refusal_is_thrown_with_its_retry_after()
    {
        await using var service = new ServiceFactory();
        var handler = new ScriptedHandler(
            service.CreateServerHandler(),
            () => ScriptedHandler.Unavailable("5"),
            () => ScriptedHandler.Unavailable("5"),
            () => ScriptedHandler.Unavailable("5"),
            () => ScriptedHandler.Unavailable("5"));
        var waits = new List<TimeSpan>();
        using var http = new HttpClient(handler) { BaseAddress = service.Server.BaseAddress };
        using var client = new LookaheadClient(http, new LookaheadClientOptions
        {
            MaxAttempts = 3,
            WaitAsync = (delay, _) => { waits.Add(delay); return Task.CompletedTask; },
        });

        var problem = await Assert.ThrowsAsync<LookaheadProblemException>(() => client.GetAliasAsync(Demo.Alias));
        Assert.Equal(HttpStatusCode.ServiceUnavailable, problem.Status);
        Assert.Equal("urn:lookahead:problem:unavailable", problem.Type);
        Assert.Equal(TimeSpan.FromSeconds(5), problem.RetryAfter);
        Assert.Equal("00-scripted", problem.TraceId);
        Assert.Equal(3, handler.Requests);
        Assert.Equal([TimeSpan.FromSeconds(5), TimeSpan.FromSeconds(5)], waits);
    }

    [Fact]
    public async Task A_retry_after_beyond_the_longest_wait_and_a_400_are_thrown_at_once()
    {
        await using var service = new ServiceFactory();
        var handler = new ScriptedHandler(service.CreateServerHandler(), () => ScriptedHandler.TooMany("120"));
        var waits = new List<TimeSpan>();
        using var http = new HttpClient(handler) { BaseAddress = service.Server.BaseAddress };
        using var client = new LookaheadClient(http, new LookaheadClientOptions
        {
            MaxRetryDelay = TimeSpan.FromSeconds(30),
            WaitAsync = (delay, _) => { waits.Add(delay); return Task.CompletedTask; },
        });

        var tooLong = await Assert.ThrowsAsync<LookaheadProblemException>(() => client.GetAliasAsync(Demo.Alias));
        Assert.Equal(HttpStatusCode.TooManyRequests, tooLong.Status);
        Assert.Equal(1, handler.Requests);

        var bad = await Assert.ThrowsAsync<LookaheadProblemException>(() => client.PlanAsync(new string('0', 64), new PlanRequest { State = [] }));
        Assert.Equal(HttpStatusCode.NotFound, bad.Status);
        Assert.Equal(2, handler.Requests);
        Assert.Empty(waits);
    }

    [Fact]
    public async Task Cancelling_during_a_retry_wait_stops_the_call_and_a_cancelled_token_sends_nothing()
    {
        await using var service = new ServiceFactory();
        var handler = new ScriptedHandler(service.CreateServerHandler(), () => ScriptedHandler.Unavailable("3"));
        using var cancel = new CancellationTokenSource();
        using var http = new HttpClient(handler) { BaseAddress = service.Server.BaseAddress };
        using var client = new LookaheadClient(http, new LookaheadClientOptions
        {
            WaitAsync = (delay, token) =>
            {
                cancel.Cancel();
                return Task.Delay(delay, token);
            },
        });

        await Assert.ThrowsAnyAsync<OperationCanceledException>(() => client.GetAliasAsync(Demo.Alias, cancel.Token));
        Assert.Equal(1, handler.Requests);

        await Assert.ThrowsAnyAsync<OperationCanceledException>(() => client.GetAliasAsync(Demo.Alias, cancel.Token));
        Assert.Equal(1, handler.Requests);
    }
}
