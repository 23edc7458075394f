using System.Diagnostics;
using System.Globalization;

namespace Lookahead.Benchmarks;

/// <summary>The figures of one station load run over its measuring window, and their Markdown.</summary>
public sealed record LoadReport(
    StationLoadOptions Options,
    double WindowSeconds,
    int Steps,
    int FirstHalfSteps,
    double P50,
    double P90,
    double P99,
    double Max,
    int NonOk,
    IReadOnlyList<StationLoop.Failure> FirstFailures,
    int NonOptimal,
    double TrackingError,
    double MoveSize,
    double? ServerMilliseconds,
    double? SolveMicroseconds,
    double? ServiceCpuMicroseconds,
    double GeneratorCpuMicroseconds,
    double? OtherProcessors,
    int StoredMismatches)
{
    public double StepsPerSecond => Steps / WindowSeconds;

    /// <summary>Counts the 200 answers that arrived inside [<paramref name="windowStart"/>, <paramref name="windowEnd"/>] (stopwatch ticks); failures count over the whole run.</summary>
    public static LoadReport From(
        StationLoadOptions options, IReadOnlyList<StationLoop> loops, long windowStart, long windowEnd, ServiceSnapshot before, ServiceSnapshot after, int storedMismatches)
    {
        var inWindow = loops.SelectMany(l => l.Answers).Where(a => a.Finished >= windowStart && a.Finished <= windowEnd).ToList();
        var latencies = inWindow.Select(a => a.Ticks * 1000.0 / Stopwatch.Frequency).Order().ToArray();
        var failures = loops.SelectMany(l => l.Failures).OrderBy(f => f.Finished).ToList();
        int steps = inWindow.Count;
        double seconds = (windowEnd - windowStart) / (double)Stopwatch.Frequency;
        double routeCount = after.RouteCount - before.RouteCount;
        double solveCount = after.SolveCount - before.SolveCount;
        return new LoadReport(
            options,
            seconds,
            steps,
            inWindow.Count(a => a.Finished < windowStart + ((windowEnd - windowStart) / 2)),
            Percentile(latencies, 0.50),
            Percentile(latencies, 0.90),
            Percentile(latencies, 0.99),
            latencies.Length == 0 ? double.NaN : latencies[^1],
            failures.Count,
            failures.Take(3).ToList(),
            inWindow.Count(a => !a.Optimal),
            inWindow.Count == 0 ? double.NaN : inWindow.Average(a => a.TrackingError),
            inWindow.Count == 0 ? double.NaN : inWindow.Average(a => a.MoveSize),
            routeCount > 0 ? 1000 * (after.RouteSeconds - before.RouteSeconds) / routeCount : null,
            solveCount > 0 ? 1e6 * (after.SolveSeconds - before.SolveSeconds) / solveCount : null,
            after.ServiceCpu is { } end && before.ServiceCpu is { } start && steps > 0 ? (end - start).TotalMicroseconds / steps : null,
            steps > 0 ? (after.GeneratorCpu - before.GeneratorCpu).TotalMicroseconds / steps : double.NaN,
            OtherWork(before, after, seconds),
            storedMismatches);
    }

    public void Write(TextWriter output)
    {
        var o = Options;
        string what = o.Route == StationLoadOptions.StepRoute ? "POST /v1/stations/{name}/step" : "POST /v1/models/{id}/plan (comparison: no estimator, no store)";
        string label = string.IsNullOrEmpty(o.Label) ? "" : $"{o.Label}: ";
        output.WriteLine(Invariant($"### {label}{what}"));
        output.WriteLine(Invariant($"{o.Stations} concurrent loops, {WindowSeconds:F1} s measured after {o.Warmup:F0} s warm-up; the generator sees {Environment.ProcessorCount} processors"));
        output.WriteLine();
        output.WriteLine("| steps | steps/s | p50 ms | p90 ms | p99 ms | max ms | non-200 |");
        output.WriteLine("|---:|---:|---:|---:|---:|---:|---:|");
        output.WriteLine(Invariant($"| {Steps} | {StepsPerSecond:F0} | {P50:F2} | {P90:F2} | {P99:F2} | {Max:F2} | {NonOk} |"));
        output.WriteLine();
        output.WriteLine("| over the window (per answer unless said) | |");
        output.WriteLine("|---|---:|");
        output.WriteLine(Invariant($"| steps/s in the first and the second half (a rise: still warming up) | {2 * FirstHalfSteps / WindowSeconds:F0}, {2 * (Steps - FirstHalfSteps) / WindowSeconds:F0} |"));
        output.WriteLine(Invariant($"| server time at the route (service's own histogram, mean) | {Format(ServerMilliseconds, "F2")} ms |"));
        output.WriteLine(Invariant($"| plan solve (service's own histogram, mean) | {Format(SolveMicroseconds, "F1")} µs |"));
        output.WriteLine(Invariant($"| service CPU | {Format(ServiceCpuMicroseconds, "F0")} µs |"));
        output.WriteLine(Invariant($"| generator CPU | {GeneratorCpuMicroseconds:F0} µs |"));
        output.WriteLine(Invariant($"| service + generator, processors busy | {Format(ServiceCpuMicroseconds is { } cpu ? (cpu + GeneratorCpuMicroseconds) * StepsPerSecond / 1e6 : null, "F2")} |"));
        output.WriteLine(Invariant($"| other work on the machine, processors busy | {Format(OtherProcessors, "F2")} |"));
        output.WriteLine(Invariant($"| plants: mean \\|y − r\\| at the measurement | {TrackingError:F3} |"));
        output.WriteLine(Invariant($"| plants: mean \\|Δu\\| of a move | {MoveSize:F3} |"));
        output.WriteLine(Invariant($"| plans not optimal | {NonOptimal} |"));
        if (o.Route == StationLoadOptions.StepRoute)
        {
            output.WriteLine(Invariant($"| stations whose stored sequence is not their loop's | {StoredMismatches} |"));
        }

        foreach (var failure in FirstFailures)
        {
            output.WriteLine(Invariant($"\nnon-200: {(int)failure.Status} {failure.Body}"));
        }

        output.WriteLine();
    }

    /// <summary>Processors' worth of CPU the rest of the machine used over the window (busy time the service and the generator do not account for).</summary>
    private static double? OtherWork(ServiceSnapshot before, ServiceSnapshot after, double seconds)
    {
        if (after.MachineBusy is not { } busyEnd || before.MachineBusy is not { } busyStart || after.ServiceCpu is not { } serviceEnd || before.ServiceCpu is not { } serviceStart)
        {
            return null;
        }

        var others = busyEnd - busyStart - (serviceEnd - serviceStart) - (after.GeneratorCpu - before.GeneratorCpu);
        return Math.Max(0, others.TotalSeconds) / seconds;
    }

    /// <summary>Nearest rank: the smallest value with at least <paramref name="q"/> of the values at or below it.</summary>
    private static double Percentile(double[] sorted, double q) =>
        sorted.Length == 0 ? double.NaN : sorted[Math.Max(0, (int)Math.Ceiling(q * sorted.Length) - 1)];

    private static string Format(double? value, string format) => value is { } v ? v.ToString(format, CultureInfo.InvariantCulture) : "—";

    private static string Invariant(FormattableString text) => text.ToString(CultureInfo.InvariantCulture);
}
