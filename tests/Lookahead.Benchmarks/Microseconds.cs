using System.Diagnostics;

namespace Lookahead.Benchmarks;

/// <summary>
/// Time between two <see cref="Stopwatch.GetTimestamp"/> readings in µs at the clock's own resolution.
/// <see cref="Stopwatch.GetElapsedTime(long, long)"/> goes through <see cref="TimeSpan"/>, whose 100 ns ticks would
/// round a plan of about 1 µs to 0.9 or 1.0 and move every ratio against it by up to 10 %.
/// </summary>
public static class Microseconds
{
    public static double Between(long start, long end) => (end - start) * 1e6 / Stopwatch.Frequency;

    public static double Since(long start) => Between(start, Stopwatch.GetTimestamp());
}
