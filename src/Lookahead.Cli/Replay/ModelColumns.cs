using System.Globalization;
using Lookahead.Client;

namespace Lookahead.Cli.Replay;

/// <summary>
/// The column names a CSV replay reads for a model (states by label or x1…, r_/r, prev_/prev, v_/v, y_/y,
/// applied_/applied): their numbers are converted from a decimal comma; every other column passes through untouched.
/// </summary>
public sealed class ModelColumns
{
    private readonly HashSet<string> names = new(StringComparer.Ordinal);

    public static ModelColumns For(ModelDetails model)
    {
        var columns = new ModelColumns();
        var d = model.Dimensions;
        var labels = model.Document.Labels;
        int q = model.Document.Plant.E is { Length: > 0 } e ? e[0].Length : 0;
        columns.Add(labels?.States, "", "x", d.N);
        columns.Add(labels?.Outputs, "r_", "r", d.P);
        columns.Add(labels?.Inputs, "prev_", "prev", d.M);
        columns.Add(labels?.Disturbances, "v_", "v", q);
        columns.Add(labels?.Outputs, "y_", "y", d.P);
        columns.Add(labels?.Inputs, "applied_", "applied", d.M);
        return columns;
    }

    public bool Contains(string column) => names.Contains(column);

    private void Add(string[]? labels, string labelPrefix, string indexPrefix, int count)
    {
        for (int i = 0; i < count; i++)
        {
            names.Add(indexPrefix + (i + 1).ToString(CultureInfo.InvariantCulture));
            if (labels is { } given && i < given.Length)
            {
                names.Add(labelPrefix + given[i]);
            }
        }
    }
}
