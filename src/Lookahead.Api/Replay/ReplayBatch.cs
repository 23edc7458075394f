namespace Lookahead.Api.Replay;

/// <summary>A fixed set of row slots filled by a source, planned in parallel, then written in order.</summary>
internal sealed class ReplayBatch
{
    private readonly ReplayRow[] rows;

    public ReplayBatch(int capacity, int n, int m, int p, int q = 0, int horizon = 1, int estimatedDisturbances = 0)
    {
        rows = new ReplayRow[capacity];
        for (int i = 0; i < capacity; i++)
        {
            rows[i] = new ReplayRow(n, m, p, q, horizon, estimatedDisturbances);
        }
    }

    public int Count { get; private set; }

    public bool IsFull => Count == rows.Length;

    public ReplayRow this[int index] => rows[index];

    public void Clear() => Count = 0;

    public ReplayRow Next(long number)
    {
        var row = rows[Count++];
        row.Reset(number);
        return row;
    }
}
