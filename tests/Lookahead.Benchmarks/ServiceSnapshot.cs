using System.Diagnostics;
using System.Globalization;

namespace Lookahead.Benchmarks;

/// <summary>
/// What the service and this process had done at one moment: CPU times and the service's own counters from
/// /metrics (request time at one route, plan solve time). Two snapshots bracket the measuring window; their
/// differences say where a step's time went without touching the service.
/// </summary>
/// <param name="ServiceCpu">The service's user + system CPU time; null when its process id was not given.</param>
/// <param name="GeneratorCpu">This process's CPU time (the load generator shares the machine).</param>
/// <param name="MachineBusy">CPU time of every process on the machine (Linux /proc/stat); null elsewhere.</param>
/// <param name="RouteSeconds">Sum of the server-side durations of 200 answers at the route measured.</param>
/// <param name="RouteCount">Count of those answers.</param>
/// <param name="SolveSeconds">Sum of plan solve times (label "station" for station steps, "plan" for /plan and alias plans).</param>
/// <param name="SolveCount">Count of those plans.</param>
public sealed record ServiceSnapshot(
    TimeSpan? ServiceCpu,
    TimeSpan GeneratorCpu,
    TimeSpan? MachineBusy,
    double RouteSeconds,
    double RouteCount,
    double SolveSeconds,
    double SolveCount)
{
    /// <summary>Takes a snapshot; <paramref name="routeTemplate"/> is the route as the metrics name it, e.g. /v1/stations/{name}/step.</summary>
    public static async Task<ServiceSnapshot> TakeAsync(HttpClient client, int? servicePid, string routeTemplate)
    {
        TimeSpan? serviceCpu = null;
        if (servicePid is { } pid)
        {
            using var service = Process.GetProcessById(pid);
            serviceCpu = service.TotalProcessorTime;
        }

        using var self = Process.GetCurrentProcess();
        var generatorCpu = self.TotalProcessorTime;
        string text = await client.GetStringAsync(new Uri("/metrics", UriKind.Relative));
        string route = $"code=\"200\",method=\"POST\",controller=\"\",action=\"\",endpoint=\"{routeTemplate}\"";

        // Station steps count their plans under their own endpoint label.
        string plans = routeTemplate.Contains("/stations/", StringComparison.Ordinal) ? "station" : "plan";
        return new ServiceSnapshot(
            serviceCpu,
            generatorCpu,
            ReadMachineBusy(),
            Value(text, $"http_request_duration_seconds_sum{{{route}}}"),
            Value(text, $"http_request_duration_seconds_count{{{route}}}"),
            Value(text, $"lookahead_plan_duration_seconds_sum{{endpoint=\"{plans}\"}}"),
            Value(text, $"lookahead_plan_duration_seconds_count{{endpoint=\"{plans}\"}}"));
    }

    /// <summary>
    /// Busy time over all processors since boot: the first line of /proc/stat less idle and I/O wait, in USER_HZ
    /// (100 per second on Linux). Other work on a shared machine shows up as busy time neither process accounts for.
    /// </summary>
    private static TimeSpan? ReadMachineBusy()
    {
        if (!File.Exists("/proc/stat"))
        {
            return null;
        }

        string first = File.ReadLines("/proc/stat").First();
        var fields = first.Split(' ', StringSplitOptions.RemoveEmptyEntries).Skip(1).Select(f => long.Parse(f, CultureInfo.InvariantCulture)).ToArray();
        long idle = fields[3] + fields[4];
        long total = fields.Take(8).Sum();
        return TimeSpan.FromMilliseconds((total - idle) * 10.0);
    }

    /// <summary>The value of one series in the Prometheus text format; 0 before the series has its first sample.</summary>
    private static double Value(string text, string series)
    {
        foreach (var line in text.Split('\n'))
        {
            if (line.StartsWith(series, StringComparison.Ordinal) && line.Length > series.Length && line[series.Length] == ' ')
            {
                return double.Parse(line.AsSpan(series.Length + 1).Trim(), CultureInfo.InvariantCulture);
            }
        }

        return 0;
    }
}
