using System.Globalization;
using System.Text.RegularExpressions;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>Durations as compose writes them: a sequence of number-unit pairs, "35s", "1m30s", "500ms".</summary>
public static partial class ComposeDuration
{
    /// <exception cref="FormatException">Not such a sequence.</exception>
    public static TimeSpan Parse(string text)
    {
        var parts = Part().Matches(text);
        if (parts.Count == 0 || string.Concat(parts.Select(p => p.Value)) != text)
        {
            throw new FormatException($"'{text}' is not a duration such as 35s or 1m30s");
        }

        return parts.Aggregate(TimeSpan.Zero, (sum, p) =>
        {
            double amount = double.Parse(p.Groups[1].Value, CultureInfo.InvariantCulture);
            return sum + p.Groups[2].Value switch
            {
                "h" => TimeSpan.FromHours(amount),
                "m" => TimeSpan.FromMinutes(amount),
                "s" => TimeSpan.FromSeconds(amount),
                "ms" => TimeSpan.FromMilliseconds(amount),
                "us" => TimeSpan.FromMicroseconds(amount),
                _ => throw new FormatException($"unit {p.Groups[2].Value} in '{text}'"),
            };
        });
    }

    [GeneratedRegex(@"(\d+(?:\.\d+)?)(ms|us|h|m|s)")]
    private static partial Regex Part();
}
