using Lookahead.Core.Planning;

namespace Lookahead.Api.Charts;

/// <summary>Names for a model's outputs and inputs (its labels, else y1…, u1…), the value axes with their units, and the time axis.</summary>
public sealed record ChartLabels(string[] Outputs, string[] Inputs, double TimeScale, string TimeUnit, string OutputAxis = "output", string InputAxis = "input")
{
    public static ChartLabels For(CompiledModel model, int steps)
    {
        var labels = model.Document.Labels;
        var outputs = labels?.Outputs ?? Enumerable.Range(1, model.OutputCount).Select(i => $"y{i}").ToArray();
        var inputs = labels?.Inputs ?? Enumerable.Range(1, model.InputCount).Select(i => $"u{i}").ToArray();

        // Minutes read better than thousands of seconds.
        bool minutes = model.SampleTime * steps >= 600;
        var units = labels?.Units;
        return new ChartLabels(outputs, inputs, minutes ? model.SampleTime / 60 : model.SampleTime, minutes ? "min" : "s", Axis("output", units?.Outputs), Axis("input", units?.Inputs));
    }

    /// <summary>"output (°C)" when the signals share a unit, "output (°C, %)" when they do not, "output" without units.</summary>
    public static string Axis(string noun, string[]? units)
    {
        var distinct = (units ?? []).Where(u => !string.IsNullOrWhiteSpace(u)).Distinct(StringComparer.Ordinal).ToArray();
        return distinct.Length == 0 ? noun : $"{noun} ({string.Join(", ", distinct)})";
    }

    public double[] Times(int count)
    {
        var t = new double[count];
        for (int k = 0; k < count; k++)
        {
            t[k] = k * TimeScale;
        }

        return t;
    }
}
