using System.Globalization;
using System.Text.Json.Nodes;
using Xunit;

namespace Lookahead.Api.Tests.Support;

/// <summary>The summary a replay answer ends with, read from any of the three formats.</summary>
public sealed record ReplaySummaryRead(long Rows, long FailedRows, bool Complete, string? Reason)
{
    /// <summary>From the JSON answer's object, or NDJSON's last line's "summary" object.</summary>
    public static ReplaySummaryRead FromJson(JsonNode totals) => new(
        totals["rows"]!.GetValue<long>(),
        totals["failedRows"]!.GetValue<long>(),
        totals["complete"]!.GetValue<bool>(),
        totals["reason"]?.GetValue<string>());

    /// <summary>From CSV's last record: #summary,rows=…,failedRows=…,complete=…, padded with empty fields.</summary>
    public static ReplaySummaryRead FromCsv(IReadOnlyList<string> record)
    {
        Assert.Equal("#summary", record[0]);
        Assert.All(record.Skip(4), f => Assert.Equal("", f));
        return new(
            long.Parse(Value(record[1], "rows"), CultureInfo.InvariantCulture),
            long.Parse(Value(record[2], "failedRows"), CultureInfo.InvariantCulture),
            bool.Parse(Value(record[3], "complete")),
            null);
    }

    private static string Value(string field, string key)
    {
        Assert.StartsWith(key + "=", field, StringComparison.Ordinal);
        return field[(key.Length + 1)..];
    }
}
