namespace Lookahead.Core.Optimization;

/// <summary>
/// Constraint normals n_j in compressed-row form. Most limits touch one or two decision variables,
/// so evaluating nᵀx costs their few entries instead of a full row.
/// </summary>
public sealed class SparseRows
{
    private readonly int[] start;
    private readonly int[] columns;
    private readonly double[] values;
    private readonly double[] norms;

    public SparseRows(int columnCount, IReadOnlyList<IReadOnlyList<(int Column, double Value)>> rows)
    {
        ColumnCount = columnCount;
        start = new int[rows.Count + 1];
        int total = rows.Sum(r => r.Count(e => e.Value != 0));
        columns = new int[total];
        values = new double[total];
        norms = new double[rows.Count];
        int at = 0;
        for (int j = 0; j < rows.Count; j++)
        {
            start[j] = at;
            double sum = 0;
            foreach (var (column, value) in rows[j].OrderBy(e => e.Column))
            {
                if (value == 0)
                {
                    continue;
                }

                if ((uint)column >= (uint)columnCount)
                {
                    throw new ArgumentOutOfRangeException(nameof(rows), $"row {j} refers to column {column} of {columnCount}");
                }

                columns[at] = column;
                values[at] = value;
                sum += value * value;
                at++;
            }

            norms[j] = Math.Sqrt(sum);
        }

        start[rows.Count] = at;
    }

    public int RowCount => norms.Length;

    /// <summary>True when row j has a single entry (a bound on one variable), so nᵀx is one product.</summary>
    public bool IsSingleton(int row) => start[row + 1] - start[row] == 1;

    public int ColumnCount { get; }

    /// <summary>Stored entries, for memory accounting.</summary>
    public int NonZeroCount => values.Length;

    /// <summary>‖n_j‖₂.</summary>
    public double Norm(int row) => norms[row];

    /// <summary>n_jᵀx.</summary>
    public double Dot(int row, ReadOnlySpan<double> x)
    {
        double sum = 0;
        for (int k = start[row]; k < start[row + 1]; k++)
        {
            sum += values[k] * x[columns[k]];
        }

        return sum;
    }

    /// <summary>The entries of row j.</summary>
    public (ReadOnlyMemory<int> Columns, ReadOnlyMemory<double> Values) Row(int row) =>
        (columns.AsMemory(start[row], start[row + 1] - start[row]), values.AsMemory(start[row], start[row + 1] - start[row]));

    internal ReadOnlySpan<int> ColumnsOf(int row) => columns.AsSpan(start[row], start[row + 1] - start[row]);

    internal ReadOnlySpan<double> ValuesOf(int row) => values.AsSpan(start[row], start[row + 1] - start[row]);
}
