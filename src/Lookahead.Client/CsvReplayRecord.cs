namespace Lookahead.Client;

/// <summary>
/// One record of a CSV replay answer: the pass-through columns, the first move by input label, cost, status and
/// message (and in an estimation replay the estimate), by the answer's header.
/// </summary>
public sealed class CsvReplayRecord
{
    private readonly CsvReplayHeader header;

    internal CsvReplayRecord(CsvReplayHeader header, long row, string[] fields)
    {
        this.header = header;
        Row = row;
        Fields = fields;
    }

    /// <summary>The answer's column names.</summary>
    public IReadOnlyList<string> Header => header.Names;

    /// <summary>1-based position among the replayed rows.</summary>
    public long Row { get; }

    public IReadOnlyList<string> Fields { get; }

    /// <summary>The field of a column, or null when the answer has no such column.</summary>
    public string? this[string column] => header.IndexOf(column) is int i && i < Fields.Count ? Fields[i] : null;

    /// <summary>optimal, iteration-limit, infeasible or error.</summary>
    public string Status => this["status"] ?? "";

    /// <summary>The errors of a bad row, or the warnings of a plan that is not a clean optimum.</summary>
    public string Message => this["message"] ?? "";
}

/// <summary>The answer's header, shared by its records.</summary>
internal sealed class CsvReplayHeader
{
    private readonly Dictionary<string, int> index;

    public CsvReplayHeader(string[] names)
    {
        Names = names;
        index = new Dictionary<string, int>(StringComparer.Ordinal);
        for (int i = 0; i < names.Length; i++)
        {
            index.TryAdd(names[i], i);
        }
    }

    public IReadOnlyList<string> Names { get; }

    public int? IndexOf(string column) => index.TryGetValue(column, out int i) ? i : null;
}
