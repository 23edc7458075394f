using Lookahead.Core.Planning;

namespace Lookahead.Api.Charts;

/// <summary>
/// Builds the two-panel chart used for plans and simulations: outputs with their setpoints (dotted), soft limits
/// (dashed) and, for a simulation with feedback from an estimator, the estimated outputs (dash-dotted) on top, inputs
/// as held steps with their hard limits (dashed) below.
/// </summary>
public static class TrajectoryChart
{
    /// <summary>Palette index of the neutral grey used for limits shared by several signals.</summary>
    private const int SharedColour = 9;

    /// <param name="outputs">Rows of p, one per sample (steps + 1).</param>
    /// <param name="inputs">Rows of m, one per move (steps).</param>
    /// <param name="references">Rows of p per move, or null when no setpoint was given.</param>
    /// <param name="estimatedOutputs">Rows of p, one per sample, of the outputs as an estimator sees them, drawn dash-dotted against the true ones; null for none.</param>
    public static Chart Build(string title, CompiledModel model, double[][] outputs, double[][] inputs, double[][]? references, double[][]? estimatedOutputs = null)
    {
        int steps = inputs.Length;
        var labels = ChartLabels.For(model, steps);
        var sampleTimes = labels.Times(outputs.Length);
        var moveTimes = labels.Times(steps + 1);
        var limits = model.Document.Limits;

        var outputSeries = new List<ChartSeries>();
        for (int j = 0; j < model.OutputCount; j++)
        {
            outputSeries.Add(new ChartSeries(labels.Outputs[j], sampleTimes, Column(outputs, j), j));
        }

        for (int j = 0; j < model.OutputCount && estimatedOutputs is not null; j++)
        {
            outputSeries.Add(new ChartSeries($"{labels.Outputs[j]} estimate", labels.Times(estimatedOutputs.Length), Column(estimatedOutputs, j), j, LineStyle.DashDot));
        }

        for (int j = 0; j < model.OutputCount && references is not null; j++)
        {
            // Held to the end so the last setpoint spans the last move.
            var r = Column(references, j);
            outputSeries.Add(new ChartSeries($"{labels.Outputs[j]} setpoint", moveTimes, [.. r, r.Length > 0 ? r[^1] : double.NaN], j, LineStyle.Dotted, Stepped: true));
        }

        AddLimit(outputSeries, limits?.OutputMin, labels.Outputs, "min", "outputs", sampleTimes);
        AddLimit(outputSeries, limits?.OutputMax, labels.Outputs, "max", "outputs", sampleTimes);

        var inputSeries = new List<ChartSeries>();
        for (int i = 0; i < model.InputCount; i++)
        {
            var u = Column(inputs, i);
            inputSeries.Add(new ChartSeries(labels.Inputs[i], moveTimes, [.. u, u.Length > 0 ? u[^1] : double.NaN], i, LineStyle.Solid, Stepped: true));
        }

        AddLimit(inputSeries, limits?.InputMin, labels.Inputs, "min", "inputs", moveTimes);
        AddLimit(inputSeries, limits?.InputMax, labels.Inputs, "max", "inputs", moveTimes);

        return new Chart(
            title,
            $"time ({labels.TimeUnit})",
            [
                new ChartPanel("Outputs", labels.OutputAxis, outputSeries),
                new ChartPanel("Inputs (held between samples)", labels.InputAxis, inputSeries),
            ]);
    }

    /// <summary>One dashed line per distinct bound; a bound shared by several signals is drawn once, in grey, naming them all.</summary>
    private static void AddLimit(List<ChartSeries> series, double?[]? bounds, string[] names, string which, string noun, double[] times)
    {
        if (bounds is null || times.Length == 0)
        {
            return;
        }

        var groups = Enumerable.Range(0, Math.Min(bounds.Length, names.Length))
            .Where(j => bounds[j] is not null)
            .GroupBy(j => bounds[j]!.Value);
        foreach (var group in groups)
        {
            var members = group.ToList();
            string label = members.Count == 1 ? $"{names[members[0]]} {which}"
                : members.Count == names.Length ? $"{which} (all {noun})"
                : $"{which}: {string.Join(", ", members.Select(j => names[j]))}";
            int colour = members.Count == 1 ? members[0] : SharedColour;
            series.Add(new ChartSeries(label, [times[0], times[^1]], [group.Key, group.Key], colour, LineStyle.Dashed));
        }
    }

    private static double[] Column(double[][] rows, int j)
    {
        var column = new double[rows.Length];
        for (int k = 0; k < rows.Length; k++)
        {
            column[k] = rows[k][j];
        }

        return column;
    }
}
