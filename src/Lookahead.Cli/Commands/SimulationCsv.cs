using System.Globalization;
using CsvHelper;
using Lookahead.Client;

namespace Lookahead.Cli.Commands;

/// <summary>
/// A closed-loop run as a table: one row per sample k = 0…T with its time, the outputs, the setpoint in force, the
/// input applied from k on, the states and, when present, measurements and estimates. Inputs and setpoints have no
/// value at the last sample (the run ends there).
/// </summary>
internal static class SimulationCsv
{
    public static void Write(Stream destination, SimulationResult run, LabelSettings? labels)
    {
        int n = run.States[0].Length, m = run.Inputs.Length > 0 ? run.Inputs[0].Length : 0, p = run.Outputs[0].Length;
        var outputs = Names(labels?.Outputs, "y", p);
        var inputs = Names(labels?.Inputs, "u", m);
        var states = Names(labels?.States, "x", n);
        var columns = new List<(string Name, double[][] Rows, int Index)>();
        void Family(IEnumerable<string> names, double[][]? rows)
        {
            if (rows is not null)
            {
                columns.AddRange(names.Select((name, i) => (name, rows, i)));
            }
        }

        Family(outputs, run.Outputs);
        Family(outputs.Select(name => "r_" + name), run.References);
        Family(inputs, run.Inputs);
        Family(states.Select(name => "x_" + name), run.States);
        Family(outputs.Select(name => "measured_" + name), run.Measurements);
        Family(states.Select(name => "xhat_" + name), run.Estimates);

        using var csv = CsvWriter.Create(destination, new CsvWriterOptions { NewLine = "\n", FormatProvider = CultureInfo.InvariantCulture, Injection = CsvInjection.None }, leaveOpen: true);
        csv.WriteField("step");
        csv.WriteField("time_s");
        foreach (var column in columns)
        {
            csv.WriteField(column.Name);
        }

        csv.EndRecord();
        for (int k = 0; k <= run.Steps; k++)
        {
            csv.WriteField(k.ToString(CultureInfo.InvariantCulture));
            csv.WriteField((k * run.SampleTime).ToString("R", CultureInfo.InvariantCulture));
            foreach (var (_, rows, i) in columns)
            {
                csv.WriteField(k < rows.Length ? rows[k][i].ToString("R", CultureInfo.InvariantCulture) : "");
            }

            csv.EndRecord();
        }
    }

    private static string[] Names(string[]? labels, string prefix, int count) =>
        labels is { } given && given.Length == count ? given : Enumerable.Range(1, count).Select(i => prefix + i.ToString(CultureInfo.InvariantCulture)).ToArray();
}
