using System.Diagnostics;
using Lookahead.Core.Planning;

namespace Lookahead.Benchmarks;

/// <summary>
/// The demo's cold limited plans on the interior point and on the range-space active set, over horizons 20 … 50, with
/// the unconstrained plan, interleaved state by state after a warm-up (<c>--cold-solvers</c>): the measurement behind
/// <see cref="ModelCompiler.RangeSpaceRowsUpTo"/>. Prints median and 99th percentile per horizon and solver, and the
/// largest difference between the two plans' inputs.
/// </summary>
public static class ColdSolvers
{
    private const int Repetitions = 7;

    public static int Run(TextWriter output, bool engineering = false)
    {
        var requests = engineering ? DemoRatios.EngineeringStates() : DemoRatios.SeededStates();
        output.WriteLine($"demo ({(engineering ? "engineering units" : "fractions")}), {requests.Count} seeded states × {Repetitions} interleaved repetitions; µs");
        output.WriteLine("horizon  rows  unconstrained  interior point (median, p99)  range space (median, p99)  max |Δu|");
        foreach (int horizon in new[] { 20, 30, 40, 50 })
        {
            var demo = engineering ? DemoRatios.EngineeringDemo() : DemoRatios.Demo();
            var document = demo with { Cost = demo.Cost with { Horizon = horizon } };
            var interiorPoint = ModelCompiler.Compile(document, new CompileOptions { RangeSpaceRowsUpTo = 0 });
            var rangeSpace = ModelCompiler.Compile(document, new CompileOptions { RangeSpaceRowsUpTo = int.MaxValue });
            var free = ModelCompiler.Compile(document with { Limits = null });
            if (!interiorPoint.UsesInteriorPoint || rangeSpace.UsesInteriorPoint || !rangeSpace.ConstrainedWithPrevious!.Solver.UsesRangeSpace)
            {
                output.WriteLine($"{horizon,7}  the two solvers are not both available at this horizon");
                continue;
            }

            JitWarmUp.Run(
                () =>
                {
                    foreach (var request in requests)
                    {
                        interiorPoint.Plan(request);
                        rangeSpace.Plan(request);
                        free.Plan(request);
                    }
                },
                3);

            var a = new double[requests.Count];
            var b = new double[requests.Count];
            var c = new double[requests.Count];
            double difference = 0;
            var ra = new double[Repetitions];
            var rb = new double[Repetitions];
            var rc = new double[Repetitions];
            for (int s = 0; s < requests.Count; s++)
            {
                var pa = interiorPoint.Plan(requests[s]);
                var pb = rangeSpace.Plan(requests[s]);
                for (int i = 0; i < pa.Inputs.Length; i++)
                {
                    difference = Math.Max(difference, Math.Abs(pa.Inputs[i] - pb.Inputs[i]));
                }

                for (int r = 0; r < Repetitions; r++)
                {
                    long t0 = Stopwatch.GetTimestamp();
                    interiorPoint.Plan(requests[s]);
                    long t1 = Stopwatch.GetTimestamp();
                    rangeSpace.Plan(requests[s]);
                    long t2 = Stopwatch.GetTimestamp();
                    free.Plan(requests[s]);
                    long t3 = Stopwatch.GetTimestamp();
                    ra[r] = Microseconds.Between(t0, t1);
                    rb[r] = Microseconds.Between(t1, t2);
                    rc[r] = Microseconds.Between(t2, t3);
                }

                a[s] = Median(ra);
                b[s] = Median(rb);
                c[s] = Median(rc);
            }

            output.WriteLine($"{horizon,7}  {rangeSpace.ConstrainedWithPrevious!.RowCount,4}  {Median(c),13:F1}  {Median(a),14:F1} {P99(a),13:F1}  {Median(b),13:F1} {P99(b),12:F1}  {difference:G2}");
        }

        return 0;
    }

    private static double P99(double[] values)
    {
        var sorted = (double[])values.Clone();
        Array.Sort(sorted);
        return sorted[(int)Math.Ceiling(0.99 * sorted.Length) - 1];
    }

    private static double Median(double[] values)
    {
        var sorted = (double[])values.Clone();
        Array.Sort(sorted);
        return sorted.Length % 2 == 1 ? sorted[sorted.Length / 2] : 0.5 * (sorted[(sorted.Length / 2) - 1] + sorted[sorted.Length / 2]);
    }
}
