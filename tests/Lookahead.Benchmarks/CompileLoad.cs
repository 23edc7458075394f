using System.Diagnostics;
using System.Globalization;
using System.Net;
using System.Text;
using System.Text.Json.Nodes;

namespace Lookahead.Benchmarks;

/// <summary>
/// Compile budgets under load (<c>--compile-load BASE_URL PID [registrations] [seconds]</c>) against a running service
/// whose process id is PID: a small model is planned back to back from two clients, first alone (the baseline), then
/// while <c>registrations</c> (default 20) different models of the largest size the default limits allow
/// (n = 200, m = 10, N = 100 with input and rate limits) are registered all at once, and again after the last
/// registration answered. Prints the small plans' latency percentiles per phase, what each registration was answered
/// (201, or 503 from a budget), and the service's resident memory (VmRSS from /proc, sampled every 50 ms) before,
/// at its peak and after. Exit code 1 when a small plan failed.
/// </summary>
public static class CompileLoad
{
    private const int States = 200;
    private const int Inputs = 10;
    private const int Horizon = 100;

    public static async Task<int> RunAsync(IReadOnlyList<string> args, TextWriter output)
    {
        if (args.Count < 2 || !Uri.TryCreate(args[0], UriKind.Absolute, out var baseUrl) || !int.TryParse(args[1], out int pid))
        {
            await Console.Error.WriteLineAsync("usage: --compile-load BASE_URL SERVICE_PID [registrations=20] [phase seconds=10]");
            return 2;
        }

        int registrations = args.Count > 2 ? int.Parse(args[2], CultureInfo.InvariantCulture) : 20;
        int seconds = args.Count > 3 ? int.Parse(args[3], CultureInfo.InvariantCulture) : 10;
        using var handler = new SocketsHttpHandler { MaxConnectionsPerServer = registrations + 4, UseProxy = false, PooledConnectionLifetime = Timeout.InfiniteTimeSpan };
        using var client = new HttpClient(handler) { BaseAddress = baseUrl, Timeout = TimeSpan.FromMinutes(10) };

        string small = await RegisterSmallAsync(client);
        string plan = """{"state":[0.4,-0.3,0.2,0,0,0,0.1,0,0,0,0,0]}""";
        var documents = Enumerable.Range(0, registrations).Select(i => LargestDocument(100 + i)).ToList();

        // Warm the plan path (tiered compilation) before the baseline.
        await PlanForAsync(client, small, plan, TimeSpan.FromSeconds(3), clients: 2);
        long rssBefore = ResidentBytes(pid);
        var baseline = await PlanForAsync(client, small, plan, TimeSpan.FromSeconds(seconds), clients: 2);

        using var sampling = new CancellationTokenSource();
        long peak = 0;
        var sampler = Task.Run(async () =>
        {
            while (!sampling.IsCancellationRequested)
            {
                peak = Math.Max(peak, ResidentBytes(pid));
                await Task.Delay(50, CancellationToken.None);
            }
        });

        var started = Stopwatch.StartNew();
        var registering = documents.Select(d => RegisterAsync(client, d)).ToList();
        var all = Task.WhenAll(registering);
        var during = await PlanWhileAsync(client, small, plan, all, clients: 2);
        var answers = await all;
        double registrationSeconds = started.Elapsed.TotalSeconds;
        var after = await PlanForAsync(client, small, plan, TimeSpan.FromSeconds(seconds), clients: 2);
        await sampling.CancelAsync();
        await sampler;
        long rssAfter = ResidentBytes(pid);

        // Idle for one more phase: the collector gives back what the compiles left behind only some time after.
        await Task.Delay(TimeSpan.FromSeconds(seconds));
        long rssIdle = ResidentBytes(pid);
        string metrics = await client.GetStringAsync("/metrics");
        string Metric(string name) => metrics.Split('\n').FirstOrDefault(l => l.StartsWith(name + " ", StringComparison.Ordinal))?[(name.Length + 1)..] ?? "?";
        double cacheBytes = double.TryParse(Metric("lookahead_model_cache_bytes"), CultureInfo.InvariantCulture, out double b) ? b : 0;

        output.WriteLine($"compile load: {registrations} concurrent registrations of {States}×{Inputs}×{Horizon} models with input and rate limits; small model planned from 2 clients");
        output.WriteLine();
        output.WriteLine("| phase | small plans | p50 ms | p99 ms | max ms | max began at s | failed |");
        output.WriteLine("| --- | ---: | ---: | ---: | ---: | ---: | ---: |");
        foreach (var (name, phase) in new[] { ("alone, before", baseline), ($"during the registrations ({registrationSeconds:f1} s)", during), ("after", after) })
        {
            output.WriteLine($"| {name} | {phase.Latencies.Count:N0} | {Percentile(phase.Latencies, 0.5):f2} | {Percentile(phase.Latencies, 0.99):f2} | {(phase.Latencies.Count == 0 ? 0 : phase.Latencies.Max()):f2} | {phase.SlowestAt:f2} | {phase.Failed} |");
        }

        output.WriteLine();
        output.WriteLine("registrations answered: " + string.Join(", ", answers.GroupBy(a => a.Status).OrderBy(g => g.Key).Select(g => $"{g.Count()} × {g.Key}")));
        foreach (var refused in answers.Where(a => a.Status is not (200 or 201 or 503)).Take(1))
        {
            output.WriteLine($"first refusal: {refused.Body}");
        }

        output.WriteLine($"registration times: first {answers.Min(a => a.Seconds):f1} s, median {Percentile([.. answers.Select(a => a.Seconds)], 0.5):f1} s, last {answers.Max(a => a.Seconds):f1} s");
        output.WriteLine($"service resident memory: before {Mb(rssBefore)}, peak {Mb(peak)}, after the last phase {Mb(rssAfter)}, after {seconds} s idle {Mb(rssIdle)}");
        output.WriteLine($"compiled-model cache then: {Metric("lookahead_model_cache_entries")} models, {Mb((long)cacheBytes)} estimated");
        return baseline.Failed + during.Failed + after.Failed == 0 ? 0 : 1;
    }

    /// <param name="SlowestAt">Seconds from the phase's start to the start of its slowest plan.</param>
    private sealed record Phase(List<double> Latencies, int Failed, double SlowestAt = 0);

    private static async Task<string> RegisterSmallAsync(HttpClient client)
    {
        string path = Path.Combine(AppContext.BaseDirectory, "six-masses.json");
        if (!File.Exists(path))
        {
            path = Path.Combine(Environment.CurrentDirectory, "tests", "load", "six-masses.json");
        }

        using var response = await client.PostAsync("/v1/models", new StringContent(await File.ReadAllTextAsync(path), Encoding.UTF8, "application/json"));
        response.EnsureSuccessStatusCode();
        return JsonNode.Parse(await response.Content.ReadAsStringAsync())!["id"]!.GetValue<string>();
    }

    private static async Task<(int Status, double Seconds, string Body)> RegisterAsync(HttpClient client, string document)
    {
        var clock = Stopwatch.StartNew();
        using var response = await client.PostAsync("/v1/models", new StringContent(document, Encoding.UTF8, "application/json"));
        string body = await response.Content.ReadAsStringAsync();
        return ((int)response.StatusCode, clock.Elapsed.TotalSeconds, body);
    }

    private static async Task<Phase> PlanForAsync(HttpClient client, string id, string body, TimeSpan length, int clients)
    {
        var until = Task.Delay(length);
        return await PlanWhileAsync(client, id, body, until, clients);
    }

    /// <summary>Plans back to back from <paramref name="clients"/> loops until <paramref name="until"/> completes.</summary>
    private static async Task<Phase> PlanWhileAsync(HttpClient client, string id, string body, Task until, int clients)
    {
        long phaseStart = Stopwatch.GetTimestamp();
        var loops = Enumerable.Range(0, clients).Select(_ => Task.Run(async () =>
        {
            var latencies = new List<double>();
            int failed = 0;
            double slowest = 0, slowestAt = 0;
            while (!until.IsCompleted)
            {
                long start = Stopwatch.GetTimestamp();
                using var response = await client.PostAsync($"/v1/models/{id}/plan", new StringContent(body, Encoding.UTF8, "application/json"));
                await response.Content.ReadAsByteArrayAsync();
                double took = Stopwatch.GetElapsedTime(start).TotalMilliseconds;
                latencies.Add(took);
                if (took > slowest)
                {
                    slowest = took;
                    slowestAt = Stopwatch.GetElapsedTime(phaseStart, start).TotalSeconds;
                }
                if (response.StatusCode != HttpStatusCode.OK)
                {
                    failed++;
                }
            }

            return (Phase: new Phase(latencies, failed, slowestAt), Slowest: slowest);
        })).ToList();
        var phases = await Task.WhenAll(loops);
        double at = phases.MaxBy(p => p.Slowest).Phase.SlowestAt;
        return new Phase([.. phases.SelectMany(p => p.Phase.Latencies)], phases.Sum(p => p.Phase.Failed), at);
    }

    /// <summary>
    /// A ∈ [−1, 1]^{n×n}·0.9/√n (spectral radius about 0.9), B ∈ [−1, 1]^{n×m}, output weight I (C = I), R = S = 0.1·I, |u| ≤ 1,
    /// |Δu| ≤ 0.2; each seed gives a different model, so every registration compiles.
    /// </summary>
    private static string LargestDocument(int seed)
    {
        var random = new Random(seed);
        string Row(int length, double scale) => "[" + string.Join(",", Enumerable.Range(0, length).Select(_ => (((random.NextDouble() * 2) - 1) * scale).ToString("R", CultureInfo.InvariantCulture))) + "]";
        string Matrix(int rows, int columns, double scale) => "[" + string.Join(",", Enumerable.Range(0, rows).Select(_ => Row(columns, scale))) + "]";
        string Repeat(double value, int count) => "[" + string.Join(",", Enumerable.Repeat(value.ToString("R", CultureInfo.InvariantCulture), count)) + "]";
        return "{\"name\":\"compile-load-" + seed + "\","
            + "\"plant\":{\"a\":" + Matrix(States, States, 0.9 / Math.Sqrt(States)) + ",\"b\":" + Matrix(States, Inputs, 1) + ",\"timeDomain\":\"discrete\",\"sampleTime\":1},"
            + "\"cost\":{\"horizon\":" + Horizon + ",\"outputWeight\":" + Repeat(1, States) + ",\"inputWeight\":" + Repeat(0.1, Inputs)
            + ",\"inputRateWeight\":" + Repeat(0.1, Inputs) + ",\"terminalWeight\":\"riccati\"},"
            + "\"limits\":{\"inputMin\":" + Repeat(-1, Inputs) + ",\"inputMax\":" + Repeat(1, Inputs)
            + ",\"inputRateMin\":" + Repeat(-0.2, Inputs) + ",\"inputRateMax\":" + Repeat(0.2, Inputs) + "}}";
    }

    private static long ResidentBytes(int pid)
    {
        try
        {
            foreach (string line in File.ReadLines($"/proc/{pid}/status"))
            {
                if (line.StartsWith("VmRSS:", StringComparison.Ordinal))
                {
                    return long.Parse(line.Split(' ', StringSplitOptions.RemoveEmptyEntries)[1], CultureInfo.InvariantCulture) * 1024;
                }
            }
        }
        catch (IOException)
        {
        }

        return 0;
    }

    private static string Mb(long bytes) => $"{bytes / (1024.0 * 1024):N0} MB";

    private static double Percentile(List<double> values, double q)
    {
        if (values.Count == 0)
        {
            return 0;
        }

        var sorted = values.Order().ToList();
        return sorted[Math.Min(sorted.Count - 1, (int)Math.Ceiling(q * sorted.Count) - 1)];
    }
}
