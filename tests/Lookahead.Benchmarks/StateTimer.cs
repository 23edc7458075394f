using System.Diagnostics;
using System.Text.Json;
using Lookahead.Core.Planning;

namespace Lookahead.Benchmarks;

/// <summary>
/// Times Lookahead's plan on given states so an outside script can time other solvers on the same states in the same
/// run (<c>--time-states FILE</c>). The file is <c>{ "case": name, "states": [[…]], "reps": R }</c>; the answer on
/// standard output is <c>{ "limited": [µs per state], "unconstrained": [µs per state] }</c>, each the median of R
/// solves after a warm-up, with the limited and the unconstrained plan of each state taken in turn.
/// </summary>
public static class StateTimer
{
    /// <summary>Calls of each plan before timing, at the least (see <see cref="JitWarmUp"/>).</summary>
    private const int WarmUpRounds = 300;

    public static int Run(string path, TextWriter output)
    {
        using var json = JsonDocument.Parse(File.ReadAllBytes(path));
        string name = json.RootElement.GetProperty("case").GetString()!;
        int reps = json.RootElement.GetProperty("reps").GetInt32();
        var states = json.RootElement.GetProperty("states").EnumerateArray()
            .Select(s => s.EnumerateArray().Select(v => v.GetDouble()).ToArray()).ToArray();

        var limited = ModelCompiler.Compile(BenchmarkModels.Get(name).Document);
        var free = ModelCompiler.Compile(limited.Document with { Limits = null });
        int next = 0;
        JitWarmUp.Run(
            () =>
            {
                var x0 = states[next++ % states.Length];
                limited.Plan(new PlanRequest(x0));
                free.Plan(new PlanRequest(x0));
            },
            WarmUpRounds);

        var limitedTimes = new double[states.Length];
        var freeTimes = new double[states.Length];
        for (int s = 0; s < states.Length; s++)
        {
            var request = new PlanRequest(states[s]);
            var a = new double[reps];
            var b = new double[reps];
            for (int r = 0; r < reps; r++)
            {
                a[r] = Time(limited, request);
                b[r] = Time(free, request);
            }

            limitedTimes[s] = Median(a);
            freeTimes[s] = Median(b);
        }

        output.WriteLine(JsonSerializer.Serialize(new { limited = limitedTimes, unconstrained = freeTimes }));
        return 0;
    }

    private static double Time(CompiledModel model, PlanRequest request)
    {
        long start = Stopwatch.GetTimestamp();
        model.Plan(request);
        return Microseconds.Since(start);
    }

    private static double Median(double[] values)
    {
        Array.Sort(values);
        return values.Length % 2 == 1 ? values[values.Length / 2] : 0.5 * (values[(values.Length / 2) - 1] + values[values.Length / 2]);
    }
}
