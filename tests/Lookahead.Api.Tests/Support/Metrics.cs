using System.Globalization;
using System.Text.RegularExpressions;

namespace Lookahead.Api.Tests.Support;

/// <summary>Reads one sample from Prometheus text exposition.</summary>
public static partial class Metrics
{
    public static async Task<double> ReadAsync(HttpClient client, string name)
    {
        string text = await client.GetStringAsync("/metrics");
        var match = Regex.Match(text, $"^{Regex.Escape(name)} ([0-9eE+.\\-]+)$", RegexOptions.Multiline);
        return match.Success ? double.Parse(match.Groups[1].Value, CultureInfo.InvariantCulture) : 0;
    }
}
