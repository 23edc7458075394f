using System.Diagnostics;
using System.Globalization;
using System.Text;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>
/// Sends hostile requests one at a time and judges each answer; collects the failures, the statuses and the time
/// each answer took (from sending to the last byte of the body).
/// </summary>
public sealed class HostileRun
{
    /// <summary>A request unanswered after this long counts as a hang (the timing bound itself is checked by the caller).</summary>
    private static readonly TimeSpan HangAfter = TimeSpan.FromSeconds(20);

    /// <summary>The status recorded for a request the host's own URL decoder refused before the service saw it.</summary>
    public const int RefusedByHost = -400;

    private readonly List<(HostileRequest Request, TimeSpan Elapsed, int Status)> answers = [];

    public List<string> Failures { get; } = [];

    public IReadOnlyList<(HostileRequest Request, TimeSpan Elapsed, int Status)> Answers => answers;

    public static async Task<HostileRun> SendAsync(HttpClient client, IEnumerable<HostileRequest> requests)
    {
        var run = new HostileRun();
        foreach (var request in requests)
        {
            await run.SendOneAsync(client, request);
        }

        return run;
    }

    private async Task SendOneAsync(HttpClient client, HostileRequest request)
    {
        using var message = new HttpRequestMessage(request.Method, new Uri(request.Path, UriKind.Relative));
        if (request.Body is not null)
        {
            message.Content = new ByteArrayContent(request.Body);
            message.Content.Headers.ContentType = null;
        }

        if (request.ContentType is not null)
        {
            message.Content ??= new ByteArrayContent([]);
            message.Content.Headers.TryAddWithoutValidation("Content-Type", request.ContentType);
        }

        using var timeout = new CancellationTokenSource(HangAfter);
        var watch = Stopwatch.StartNew();
        HttpResponseMessage response;
        string body;
        try
        {
            response = await client.SendAsync(message, timeout.Token);
            body = await response.Content.ReadAsStringAsync(timeout.Token);
        }
        catch (OperationCanceledException) when (timeout.IsCancellationRequested)
        {
            Failures.Add($"no answer within {HangAfter.TotalSeconds} s: {request}");
            answers.Add((request, watch.Elapsed, 0));
            return;
        }
        catch (InvalidOperationException ex) when (IsNulInPath(request, ex))
        {
            // ASP.NET Core's URL decoder refuses a decoded NUL before any middleware runs: the in-memory host throws
            // here, Kestrel answers a bare 400 (pinned by HostilePathsOverHttpTests). Nothing reached the service.
            answers.Add((request, watch.Elapsed, RefusedByHost));
            return;
        }

        watch.Stop();
        using (response)
        {
            int status = (int)response.StatusCode;
            answers.Add((request, watch.Elapsed, status));
            string? mediaType = response.Content.Headers.ContentType?.MediaType;
            if (HostileOracle.Judge(request, status, mediaType, body) is { } why)
            {
                Failures.Add($"{why}: {request}\n    answer: {(body.Length > 400 ? body[..400] + "…" : body)}");
            }
        }
    }

    /// <summary>
    /// The best of <paramref name="attempts"/> more sends of a request that answered slowly once. A request that is slow
    /// to handle is slow every time; a collection or a compile of the runtime that happened to land on it is not.
    /// The answers of these sends are not judged again (a refused request changes nothing, so resending it is safe).
    /// </summary>
    public static async Task<TimeSpan> RetimeAsync(HttpClient client, HostileRequest request, int attempts = 2)
    {
        var best = TimeSpan.MaxValue;
        for (int i = 0; i < attempts; i++)
        {
            var again = new HostileRun();
            await again.SendOneAsync(client, request);
            best = again.answers[0].Elapsed < best ? again.answers[0].Elapsed : best;
        }

        return best;
    }

    private static bool IsNulInPath(HostileRequest request, InvalidOperationException exception) =>
        request.Path.Contains("%00", StringComparison.Ordinal) && exception.Message.Contains("null characters", StringComparison.Ordinal);

    /// <summary>Counts by status and by family, the timing distribution and the slowest requests.</summary>
    public string Report(int slowest = 5)
    {
        var text = new StringBuilder();
        text.AppendLine(CultureInfo.InvariantCulture, $"{answers.Count} requests, {answers.Select(a => a.Request.Family).Distinct().Count()} families, {Failures.Count} failures");
        text.AppendLine("by status: " + string.Join(", ", answers.GroupBy(a => a.Status).OrderBy(g => g.Key).Select(g => $"{g.Key}: {g.Count()}")));
        var times = answers.Select(a => a.Elapsed.TotalMilliseconds).Order().ToArray();
        if (times.Length > 0)
        {
            double Percentile(double p) => times[Math.Min(times.Length - 1, (int)Math.Ceiling(p * times.Length) - 1)];
            text.AppendLine(CultureInfo.InvariantCulture, $"elapsed ms: median {Percentile(0.5):F2}, p99 {Percentile(0.99):F2}, p99.9 {Percentile(0.999):F2}, max {times[^1]:F2}, total {times.Sum() / 1000:F1} s");
        }

        foreach (var (request, elapsed, status) in answers.OrderByDescending(a => a.Elapsed).Take(slowest))
        {
            text.AppendLine(CultureInfo.InvariantCulture, $"  slow: {elapsed.TotalMilliseconds:F1} ms → {status} {request}");
        }

        text.AppendLine("answered 2xx (stateless endpoints where the corpus allows it, replays with error rows): " + string.Join(", ", answers.Where(a => a.Status is >= 200 and < 300).GroupBy(a => a.Request.Family).OrderBy(g => g.Key, StringComparer.Ordinal).Select(g => $"{g.Key} {g.Count()}")));
        text.AppendLine("by family: " + string.Join(", ", answers.GroupBy(a => a.Request.Family).OrderBy(g => g.Key, StringComparer.Ordinal).Select(g => $"{g.Key} {g.Count()}")));
        return text.ToString();
    }
}
