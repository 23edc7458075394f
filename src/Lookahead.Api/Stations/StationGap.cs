namespace Lookahead.Api.Stations;

/// <summary>
/// Samples missed between two steps, from the plant's timestamps: none when either step gave no timestamp or they are
/// at most 1.5 sample times apart; otherwise the gap in sample times, rounded, less the one this step is.
/// </summary>
public static class StationGap
{
    /// <summary>Missed samples, or −1 when <paramref name="now"/> is not after <paramref name="last"/>.</summary>
    /// <param name="cap">Any count above it is reported as cap + 1 (the caller starts over): the count is never formed from an absurd gap.</param>
    public static long MissedSamples(DateTimeOffset? last, DateTimeOffset? now, double sampleTime, int cap)
    {
        if (last is not { } before || now is not { } after)
        {
            return 0;
        }

        if (after <= before)
        {
            return -1;
        }

        double samples = (after - before).TotalSeconds / sampleTime;
        if (samples <= 1.5)
        {
            return 0;
        }

        return samples > cap + 1.5 ? cap + 1L : (long)Math.Round(samples, MidpointRounding.AwayFromZero) - 1;
    }
}
