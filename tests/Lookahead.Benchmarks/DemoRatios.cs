using System.Diagnostics;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;

namespace Lookahead.Benchmarks;

/// <summary>
/// The demo model (cold store, all its limits) over 200 seeded states spread over its operating range — zones from
/// 2 °C below to 3 °C above their setpoints, half with a previous input — against the same model with its limits
/// removed, interleaved state by state after a warm-up (<c>--demo-ratios</c>). Prints the median and 99th percentile
/// of the limited plan's time as multiples of the unconstrained plan's median, with iteration counts.
/// </summary>
public static class DemoRatios
{
    private const int States = 200;
    private const int Repetitions = 9;
    private const int WarmUpRounds = 3;

    /// <summary>The demo as it was before it moved to engineering units (trim inputs as fractions 0…1, deviations in K).</summary>
    public static ModelDocument Demo() => new(
        "cold-store-demo",
        new PlantSpec(
            [[-0.000417, 0.000139, 0.0], [0.000139, -0.000556, 0.000139], [0.0, 0.000139, -0.000417]],
            [[-0.0012, 0.0, 0.0009], [-0.0005, -0.0004, 0.0002], [0.0, -0.0014, 0.0]],
            null,
            60,
            TimeDomain.Continuous),
        new CostSpec(30, WeightSpec.FromDiagonal([1.0, 1.0, 1.0]), WeightSpec.FromDiagonal([0.05, 0.05, 0.02]), WeightSpec.FromDiagonal([0.5, 0.5, 0.2]), TerminalWeightSpec.Riccati),
        new LimitsSpec([0.0, 0.0, 0.0], [1.0, 1.0, 1.0], [-0.2, -0.2, -0.5], [0.2, 0.2, 0.5], [-3.0, -3.0, -3.0], [2.0, 2.0, 2.0], [100.0, 100.0, 100.0]));

    /// <summary>
    /// The demo as the service serves it: engineering units (°C around −20, trim in %), the outdoor temperature as
    /// a measured disturbance and an estimator — the same plant, inputs scaled ×100 (<c>--demo-ratios engineering</c>).
    /// </summary>
    public static ModelDocument EngineeringDemo()
    {
        var old = Demo();
        return old with
        {
            Plant = old.Plant with { B = old.Plant.B.Select(row => row.Select(v => v / 100).ToArray()).ToArray(), E = [[0.0000036], [0.0000035], [0.000007]] },
            Cost = old.Cost with { InputWeight = WeightSpec.FromDiagonal([0.000005, 0.000005, 0.000002]), InputRateWeight = WeightSpec.FromDiagonal([0.00005, 0.00005, 0.00002]) },
            Limits = new LimitsSpec([0.0, 0.0, 0.0], [100.0, 100.0, 100.0], [-20.0, -20.0, -50.0], [20.0, 20.0, 50.0], [-23.0, -23.0, -23.0], [-18.0, -18.0, -18.0], [100.0, 100.0, 100.0]),
            OperatingPoint = new OperatingPointSpec([-20.0, -20.0, -20.0], [0.0, 0.0, 0.0], [-20.0, -20.0, -20.0], [15.0]),
        };
    }

    /// <summary>The seeded states in the engineering demo's units (−20 °C added, previous inputs ×100).</summary>
    public static IReadOnlyList<PlanRequest> EngineeringStates() =>
        SeededStates().Select(r => new PlanRequest(r.State.Select(v => v - 20).ToArray(), PreviousInput: r.PreviousInput?.Select(v => v * 100).ToArray())).ToList();

    public static IReadOnlyList<PlanRequest> SeededStates()
    {
        var random = new Random(2026);
        var requests = new List<PlanRequest>(States);
        for (int i = 0; i < States; i++)
        {
            double[] state = [random.NextDouble() * 5 - 2, random.NextDouble() * 5 - 2, random.NextDouble() * 5 - 2];
            double[]? previous = i % 2 == 0 ? null : [random.NextDouble(), random.NextDouble(), random.NextDouble()];
            requests.Add(new PlanRequest(state, PreviousInput: previous));
        }

        return requests;
    }

    public static int Run(TextWriter output, bool engineering = false)
    {
        var document = engineering ? EngineeringDemo() : Demo();
        var limited = ModelCompiler.Compile(document);
        var free = ModelCompiler.Compile(document with { Limits = null });
        var requests = engineering ? EngineeringStates() : SeededStates();
        JitWarmUp.Run(
            () =>
            {
                foreach (var request in requests)
                {
                    limited.Plan(request);
                    free.Plan(request);
                }
            },
            WarmUpRounds);

        var limitedTimes = new double[requests.Count];
        var freeTimes = new double[requests.Count];
        var iterations = new int[requests.Count];
        var a = new double[Repetitions];
        var b = new double[Repetitions];
        for (int s = 0; s < requests.Count; s++)
        {
            for (int r = 0; r < Repetitions; r++)
            {
                long t0 = Stopwatch.GetTimestamp();
                iterations[s] = limited.Plan(requests[s]).Iterations;
                long t1 = Stopwatch.GetTimestamp();
                free.Plan(requests[s]);
                long t2 = Stopwatch.GetTimestamp();
                a[r] = Microseconds.Between(t0, t1);
                b[r] = Microseconds.Between(t1, t2);
            }

            limitedTimes[s] = Median(a);
            freeTimes[s] = Median(b);
        }

        double freeMedian = Median(freeTimes);
        Array.Sort(limitedTimes);
        double median = Median(limitedTimes);
        double p99 = limitedTimes[(int)Math.Ceiling(0.99 * limitedTimes.Length) - 1];
        Array.Sort(iterations);
        output.WriteLine($"demo ({(engineering ? "engineering units" : "fractions")}), {requests.Count} seeded states × {Repetitions} interleaved repetitions");
        output.WriteLine($"unconstrained plan (limits removed): median {freeMedian:F3} µs");
        output.WriteLine($"limited plan: median {median:F1} µs = {median / freeMedian:F1}×, p99 {p99:F1} µs = {p99 / freeMedian:F1}×");
        output.WriteLine($"iterations: median {iterations[iterations.Length / 2]}, mean {iterations.Average():F2}, max {iterations[^1]}");
        return 0;
    }

    private static double Median(double[] values)
    {
        var sorted = (double[])values.Clone();
        Array.Sort(sorted);
        return sorted.Length % 2 == 1 ? sorted[sorted.Length / 2] : 0.5 * (sorted[(sorted.Length / 2) - 1] + sorted[sorted.Length / 2]);
    }
}
