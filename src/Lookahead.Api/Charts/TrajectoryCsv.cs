using System.Globalization;
using CsvHelper;
using Lookahead.Api.Http;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Charts;

/// <summary>
/// ?format=csv on plan and simulate: one row per sample k = 0…N (or 0…T) with its time, named from the model's labels
/// with a prefix per kind so labels shared between kinds cannot clash: y_ outputs, r_ setpoints, u_ inputs, x_ states,
/// and for a simulation ym_ measurements, yhat_ estimated outputs, xhat_ state estimates and dhat1… disturbance
/// estimates (replay's names for those). Without labels the columns are y1…, r1…, u1…, x1…. Moves and setpoints
/// have one row fewer than samples: their cells in the last row are empty. The last column, warnings, repeats the
/// answer's warning codes on every row (a plan also repeats its status), so a saved table still says what was not a
/// clean optimum.
/// </summary>
public static class TrajectoryCsv
{
    public const string ContentType = "text/csv";

    /// <summary>One group of columns: a name per column and its rows (null: the group is left out).</summary>
    private sealed record Group(IEnumerable<string> Names, double[][]? Rows);

    /// <param name="status">A plan's status, repeated on each row so a saved table still says whether it was a clean optimum; null for a simulation.</param>
    /// <param name="warnings">The answer's warning codes, space-separated (empty when none), repeated on each row for the same reason.</param>
    public static string Write(CompiledModel model, IReadOnlyList<(string Prefix, string Fallback, string[]? Labels, int Width, double[][]? Rows)> groups, int samples, string? status, string warnings)
    {
        var present = groups.Where(g => g.Rows is not null).Select(g => new Group(Names(g.Labels, g.Width, g.Prefix, g.Fallback), g.Rows)).ToList();
        using var text = new StringWriter(CultureInfo.InvariantCulture);
        using (var csv = CsvWriter.Create(text, new CsvWriterOptions { NewLine = "\n", FormatProvider = CultureInfo.InvariantCulture, Injection = CsvInjection.None }))
        {
            csv.WriteField("step");
            csv.WriteField("time_s");
            foreach (var name in present.SelectMany(g => g.Names))
            {
                csv.WriteField(name);
            }

            if (status is not null)
            {
                csv.WriteField("status");
            }

            csv.WriteField("warnings");
            csv.EndRecord();
            for (int k = 0; k < samples; k++)
            {
                csv.WriteField(k.ToString(CultureInfo.InvariantCulture));
                csv.WriteField((k * model.SampleTime).ToString("R", CultureInfo.InvariantCulture));
                foreach (var group in present)
                {
                    int width = group.Names.Count();
                    var row = k < group.Rows!.Length ? group.Rows[k] : null;
                    for (int j = 0; j < width; j++)
                    {
                        csv.WriteField(row is null ? "" : row[j].ToString("R", CultureInfo.InvariantCulture));
                    }
                }

                if (status is not null)
                {
                    csv.WriteField(status);
                }

                csv.WriteField(warnings);
                csv.EndRecord();
            }

            csv.Flush();
        }

        return text.ToString();
    }

    /// <summary>The columns of a plan: outputs y_0…y_N, the setpoint of each stage, moves u_0…u_{N−1}, states x_0…x_N.</summary>
    public static string Plan(CompiledModel model, double[][] outputs, double[][]? references, double[][] inputs, double[][] states, string status, IEnumerable<Warning> warnings)
    {
        var labels = model.Document.Labels;
        return Write(
            model,
            [
                ("y_", "y", labels?.Outputs, model.OutputCount, outputs),
                ("r_", "r", labels?.Outputs, model.OutputCount, references),
                ("u_", "u", labels?.Inputs, model.InputCount, inputs),
                ("x_", "x", labels?.States, model.StateCount, states),
            ],
            outputs.Length,
            status,
            Codes(warnings));
    }

    /// <summary>The columns of a closed-loop run, T + 1 rows.</summary>
    public static string Simulation(CompiledModel model, SimulationResult result)
    {
        var labels = model.Document.Labels;
        int disturbances = result.DisturbanceEstimates is { Length: > 0 } d ? d[0].Length : 0;
        return Write(
            model,
            [
                ("y_", "y", labels?.Outputs, model.OutputCount, result.Outputs),
                ("r_", "r", labels?.Outputs, model.OutputCount, result.References),
                ("u_", "u", labels?.Inputs, model.InputCount, result.Inputs),
                ("ym_", "ym", labels?.Outputs, model.OutputCount, result.Measurements),
                ("yhat_", "yhat", labels?.Outputs, model.OutputCount, result.EstimatedOutputs),
                ("x_", "x", labels?.States, model.StateCount, result.States),
                ("xhat_", "xhat", labels?.States, model.StateCount, result.Estimates),
                ("", "dhat", null, disturbances, result.DisturbanceEstimates),
            ],
            result.Outputs.Length,
            null,
            Codes(result.Warnings));
    }

    private static string Codes(IEnumerable<Warning> warnings) => string.Join(' ', warnings.Select(w => WireNames.Warning(w.Code)));

    private static string[] Names(string[]? labels, int count, string prefix, string fallback) =>
        labels is { } given && given.Length == count
            ? [.. given.Select(l => prefix + l)]
            : [.. Enumerable.Range(1, count).Select(i => $"{fallback}{i}")];
}
