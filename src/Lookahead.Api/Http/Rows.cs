namespace Lookahead.Api.Http;

/// <summary>The core keeps trajectories row-major and flat; the wire shows them as arrays of rows.</summary>
public static class Rows
{
    public static double[][] Split(double[] flat, int columns)
    {
        if (columns == 0)
        {
            return [];
        }

        var rows = new double[flat.Length / columns][];
        for (int i = 0; i < rows.Length; i++)
        {
            rows[i] = flat.AsSpan(i * columns, columns).ToArray();
        }

        return rows;
    }

    public static double? Finite(double value) => double.IsFinite(value) ? value : null;
}
