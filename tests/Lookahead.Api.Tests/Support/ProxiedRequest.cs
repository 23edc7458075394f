using System.Globalization;

namespace Lookahead.Api.Tests.Support;

/// <summary>One access-log entry of <see cref="NginxProxy"/>.</summary>
/// <param name="Number">The <c>plan-number</c> request header a <see cref="PlanStream"/> sends, else null.</param>
public sealed record ProxiedRequest(int Status, IReadOnlyList<string> Upstreams, string UpstreamStatuses, string Request, int? Number = null)
{
    /// <summary>nginx tried more than one replica for it.</summary>
    public bool Retried => Upstreams.Count > 1;

    public static ProxiedRequest Parse(string line)
    {
        string[] parts = line.Split('|');
        var upstreams = parts[1].Split(',', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries)
            .Where(u => u != "-")
            .ToList();
        int? number = parts.Length > 4 && int.TryParse(parts[4], NumberStyles.None, CultureInfo.InvariantCulture, out int n) ? n : null;
        return new ProxiedRequest(int.Parse(parts[0], CultureInfo.InvariantCulture), upstreams, parts[2], parts[3], number);
    }
}
