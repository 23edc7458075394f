using System.Text.Json.Serialization;

namespace Lookahead.Api.Plans;

/// <summary>
/// A trajectory on the wire: an array of rows of numbers, written straight from the core's row-major array
/// (no jagged copy) with <see cref="CompactNumber"/>. Read back as the same shape.
/// </summary>
[JsonConverter(typeof(TrajectoryRowsConverter))]
public sealed class TrajectoryRows
{
    public TrajectoryRows(double[] values, int columns)
    {
        Values = values;
        Columns = columns;
    }

    /// <summary>Row-major entries.</summary>
    public double[] Values { get; }

    public int Columns { get; }

    public int RowCount => Columns == 0 ? 0 : Values.Length / Columns;

    public ReadOnlySpan<double> Row(int row) => Values.AsSpan(row * Columns, Columns);

    public double[][] ToJagged() => Enumerable.Range(0, RowCount).Select(r => Row(r).ToArray()).ToArray();
}
