using System.Text.Json.Nodes;
using Xunit;

namespace Lookahead.Api.Tests.Support;

/// <summary>
/// Splits a finished replay answer into its results and the summary it ends with, checking that the summary is last
/// and says the replay is complete.
/// </summary>
public static class ReplayAnswer
{
    /// <summary>The result lines of an NDJSON answer, the summary line checked and left off.</summary>
    public static List<JsonNode> NdjsonResults(string text)
    {
        var lines = text.Split('\n', StringSplitOptions.RemoveEmptyEntries).Select(l => JsonNode.Parse(l)!).ToList();
        Assert.NotEmpty(lines);
        var summary = ReplaySummaryRead.FromJson(lines[^1]["summary"] ?? throw new Xunit.Sdk.XunitException($"the last NDJSON line is not the summary: {lines[^1].ToJsonString()}"));
        Assert.True(summary.Complete);
        Assert.Equal(lines.Count - 1, summary.Rows);
        return lines[..^1];
    }

    /// <summary>The records of a CSV answer (header first), the summary record checked and left off.</summary>
    public static List<List<string>> CsvRecords(string text)
    {
        var records = CsvText.Records(text);
        Assert.NotEmpty(records);
        var summary = ReplaySummaryRead.FromCsv(records[^1]);
        Assert.True(summary.Complete);
        Assert.Equal(records.Count - 2, summary.Rows);
        return records[..^1];
    }

    /// <summary>The lines of a CSV answer whose fields hold no line breaks (header first), the summary line checked and left off.</summary>
    public static string[] CsvLines(string text)
    {
        CsvRecords(text);
        var lines = text.Split('\n', StringSplitOptions.RemoveEmptyEntries);
        return lines[..^1];
    }
}
