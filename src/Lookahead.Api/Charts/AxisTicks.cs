namespace Lookahead.Api.Charts;

/// <summary>"Nice" axis ticks: steps of 1, 2 or 5 × 10^k, about five per axis.</summary>
public static class AxisTicks
{
    public static (double Low, double High, double Step) Range(double min, double max, int target = 5)
    {
        if (!double.IsFinite(min) || !double.IsFinite(max))
        {
            return (0, 1, 0.2);
        }

        if (max - min < 1e-12)
        {
            // A flat line still needs an axis around it.
            double pad = Math.Max(Math.Abs(min) * 0.1, 0.5);
            min -= pad;
            max += pad;
        }

        double step = NiceStep((max - min) / target);
        return (Math.Floor(min / step) * step, Math.Ceiling(max / step) * step, step);
    }

    public static IEnumerable<double> Values(double low, double high, double step)
    {
        int count = (int)Math.Round((high - low) / step);
        for (int i = 0; i <= count && i <= 100; i++)
        {
            double v = low + (i * step);
            yield return Math.Abs(v) < step * 1e-9 ? 0 : v;
        }
    }

    private static double NiceStep(double rough)
    {
        double magnitude = Math.Pow(10, Math.Floor(Math.Log10(rough)));
        double fraction = rough / magnitude;
        double nice = fraction <= 1 ? 1 : fraction <= 2 ? 2 : fraction <= 5 ? 5 : 10;
        return nice * magnitude;
    }
}
