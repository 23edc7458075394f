using Lookahead.Core.Planning;

namespace Lookahead.Api.Charts;

/// <summary>Names for a model's outputs and inputs (its labels, else y1…, u1…) and the time axis.</summary>
public sealed record ChartLabels(string[] Outputs, string[] Inputs, double TimeScale, string TimeUnit)
{
    public static ChartLabels For(CompiledModel model, int steps)
    {
        var labels = model.Document.Labels;
        var outputs = labels?.Outputs ?? Enumerable.Range(1, model.OutputCount).Select(i => $"y{i}").ToArray();
        var inputs = labels?.Inputs ?? Enumerable.Range(1, model.InputCount).Select(i => $"u{i}").ToArray();

        // Minutes read better than thousands of seconds.
        bool minutes = model.SampleTime * steps >= 600;
        return new ChartLabels(outputs, inputs, minutes ? model.SampleTime / 60 : model.SampleTime, minutes ? "min" : "s");
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
