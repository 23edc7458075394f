namespace Lookahead.Core.Planning;

/// <summary>
/// The setpoint of each stage's output term: one row held for every stage (stride 0), or one row per stage
/// (stride p, N rows). Empty means none (regulation to zero).
/// </summary>
internal readonly ref struct StageReferences(ReadOnlySpan<double> rows, int stride)
{
    private readonly ReadOnlySpan<double> rows = rows;
    private readonly int stride = stride;

    /// <summary>r_k (p entries), or empty for none.</summary>
    public ReadOnlySpan<double> At(int stage, int outputs) => rows.IsEmpty ? rows : rows.Slice(stride * stage, outputs);
}
