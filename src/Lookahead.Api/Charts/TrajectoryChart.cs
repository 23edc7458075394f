using System.Globalization;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Charts;

/// <summary>
/// Builds the three-panel chart used for plans and simulations: outputs with their setpoints (dotted), soft limits and,
/// for a simulation with feedback from an estimator, the estimated outputs (dash-dotted), with the samples outside a
/// soft limit shaded; inputs as held steps with their hard limits; and the moves Δu per sample with the rate limits.
/// Limits are labelled with their values and units and drawn beneath the signals, so a signal lying on one stays seen.
/// </summary>
public static class TrajectoryChart
{
    /// <summary>Palette index of the neutral grey used for limits shared by several signals.</summary>
    private const int SharedColour = 9;

    /// <param name="outputs">Rows of p, one per sample (steps + 1).</param>
    /// <param name="inputs">Rows of m, one per move (steps).</param>
    /// <param name="references">Rows of p per move, or null when no setpoint was given.</param>
    /// <param name="estimatedOutputs">Rows of p, one per sample, of the outputs as an estimator sees them, drawn dash-dotted against the true ones; null for none.</param>
    /// <param name="previousInput">The input held before the first move, so the first move Δu₀ can be drawn; null leaves it out.</param>
    public static Chart Build(string title, CompiledModel model, double[][] outputs, double[][] inputs, double[][]? references, double[][]? estimatedOutputs = null, double[]? previousInput = null)
    {
        int steps = inputs.Length;
        var labels = ChartLabels.For(model, steps);
        var sampleTimes = labels.Times(outputs.Length);
        var moveTimes = labels.Times(steps + 1);
        var limits = model.Document.Limits;
        var units = model.Document.Labels?.Units;

        var outputSeries = new List<ChartSeries>();
        AddLimit(outputSeries, limits?.OutputMin, labels.Outputs, units?.Outputs, LineStyle.LimitMin, "outputs", sampleTimes);
        AddLimit(outputSeries, limits?.OutputMax, labels.Outputs, units?.Outputs, LineStyle.LimitMax, "outputs", sampleTimes);
        var spans = new List<ChartSpan>();
        for (int j = 0; j < model.OutputCount; j++)
        {
            var y = Column(outputs, j);
            outputSeries.Add(new ChartSeries(labels.Outputs[j], sampleTimes, y, j));
            spans.AddRange(Violations(y, sampleTimes, limits?.OutputMin?[j], limits?.OutputMax?[j], labels.Outputs[j]));
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

        var inputSeries = new List<ChartSeries>();
        AddLimit(inputSeries, limits?.InputMin, labels.Inputs, units?.Inputs, LineStyle.LimitMin, "inputs", moveTimes);
        AddLimit(inputSeries, limits?.InputMax, labels.Inputs, units?.Inputs, LineStyle.LimitMax, "inputs", moveTimes);
        var moveSeries = new List<ChartSeries>();
        var moveNames = labels.Inputs.Select(n => $"Δ{n}").ToArray();
        AddLimit(moveSeries, limits?.InputRateMin, moveNames, units?.Inputs, LineStyle.LimitMin, "moves", moveTimes);
        AddLimit(moveSeries, limits?.InputRateMax, moveNames, units?.Inputs, LineStyle.LimitMax, "moves", moveTimes);
        for (int i = 0; i < model.InputCount; i++)
        {
            var u = Column(inputs, i);
            inputSeries.Add(new ChartSeries(labels.Inputs[i], moveTimes, [.. u, u.Length > 0 ? u[^1] : double.NaN], i, LineStyle.Solid, Stepped: true));
            var du = new double[u.Length + 1];
            for (int k = 0; k < u.Length; k++)
            {
                du[k] = k > 0 ? u[k] - u[k - 1] : previousInput is null ? double.NaN : u[0] - previousInput[i];
            }

            du[^1] = u.Length > 0 ? du[^2] : double.NaN;
            moveSeries.Add(new ChartSeries(moveNames[i], moveTimes, du, i, LineStyle.Solid, Stepped: true));
        }

        string sample = model.SampleTime % 60 == 0 && model.SampleTime >= 60
            ? $"{(model.SampleTime / 60).ToString(CultureInfo.InvariantCulture)} min"
            : $"{model.SampleTime.ToString("G4", CultureInfo.InvariantCulture)} s";
        return new Chart(
            title,
            $"time ({labels.TimeUnit})",
            [
                new ChartPanel(spans.Count > 0 ? "Outputs (shaded: outside a soft limit)" : "Outputs", labels.OutputAxis, outputSeries, spans),
                new ChartPanel("Inputs (held between samples)", labels.InputAxis, inputSeries),
                new ChartPanel($"Input moves per sample ({sample}) with rate limits", ChartLabels.Axis("move", units?.Inputs), moveSeries),
            ]);
    }

    /// <summary>Runs of samples outside [min, max] (beyond rounding), each as a span from its first to its last sample.</summary>
    public static IEnumerable<ChartSpan> Violations(double[] y, double[] times, double? min, double? max, string name)
    {
        double tolerance = 1e-9 * Math.Max(1, Math.Max(Math.Abs(min ?? 0), Math.Abs(max ?? 0)));
        int start = -1;
        for (int k = 0; k <= y.Length; k++)
        {
            bool outside = k < y.Length && double.IsFinite(y[k]) && ((min is { } lo && y[k] < lo - tolerance) || (max is { } hi && y[k] > hi + tolerance));
            if (outside && start < 0)
            {
                start = k;
            }
            else if (!outside && start >= 0)
            {
                yield return new ChartSpan(times[start], times[k - 1], $"{name} outside its soft limits");
                start = -1;
            }
        }
    }

    /// <summary>One line per distinct bound; a bound shared by several signals is drawn once, in grey, naming them all.</summary>
    private static void AddLimit(List<ChartSeries> series, double?[]? bounds, string[] names, string[]? units, LineStyle style, string noun, double[] times)
    {
        if (bounds is null || times.Length == 0)
        {
            return;
        }

        string which = style == LineStyle.LimitMin ? "min" : "max";
        var groups = Enumerable.Range(0, Math.Min(bounds.Length, names.Length))
            .Where(j => bounds[j] is not null)
            .GroupBy(j => bounds[j]!.Value);
        foreach (var group in groups)
        {
            var members = group.ToList();
            string? unit = units is { } u && members[0] < u.Length && !string.IsNullOrWhiteSpace(u[members[0]]) ? u[members[0]] : null;
            string value = group.Key.ToString("G6", CultureInfo.InvariantCulture).Replace('-', '−') + (unit is null ? "" : " " + unit);
            string label = members.Count == 1 ? $"{names[members[0]]} {which} {value}"
                : members.Count == names.Length ? $"{which} {value} (all {noun})"
                : $"{which} {value}: {string.Join(", ", members.Select(j => names[j]))}";
            int colour = members.Count == 1 ? members[0] : SharedColour;
            series.Add(new ChartSeries(label, [times[0], times[^1]], [group.Key, group.Key], colour, style, ValueLabel: $"{which} {value}"));
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
