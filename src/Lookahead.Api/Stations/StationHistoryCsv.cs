using System.Globalization;
using System.Text;
using CsvHelper;
using Lookahead.Core.Models;

namespace Lookahead.Api.Stations;

/// <summary>
/// A station's history as a table, one step a row, with the replay's column names so the same tools read both:
/// sequence, stepped_at, timestamp, mode, model_id, y_… (measurement, empty when missing), applied_…, the first move
/// (input labels, else u1…um), xhat_…, dhat…, missed_samples, status and message (each warning as "code: sentence").
/// Columns are named from the station's current model; a step taken with a model of other dimensions leaves the
/// vector cells it cannot fill empty and says so in its message.
/// </summary>
public static class StationHistoryCsv
{
    public const string ContentType = "text/csv";

    public static byte[] Write(IReadOnlyList<StationStepEntry> steps, LabelsSpec? labels, int states, int inputs, int outputs, int disturbances)
    {
        using var buffer = new MemoryStream();
        using (var csv = CsvWriter.Create(buffer, new CsvWriterOptions { NewLine = "\n", FormatProvider = CultureInfo.InvariantCulture, Injection = CsvInjection.None }, leaveOpen: true))
        {
            var header = new List<string> { "sequence", "stepped_at", "timestamp", "mode", "model_id" };
            header.AddRange(Names(labels?.Outputs, outputs, "y_", "y"));
            header.AddRange(Names(labels?.Inputs, inputs, "applied_", "applied"));
            header.AddRange(Names(labels?.Inputs, inputs, "", "u"));
            header.AddRange(Names(labels?.States, states, "xhat_", "xhat"));
            header.AddRange(Enumerable.Range(1, disturbances).Select(i => $"dhat{i}"));
            header.AddRange(["missed_samples", "status", "message"]);
            foreach (var name in header)
            {
                csv.WriteField(name);
            }

            csv.EndRecord();
            foreach (var step in steps)
            {
                var answer = step.Answer;
                var mismatched = new List<string>();
                csv.WriteField(step.Sequence.ToString(CultureInfo.InvariantCulture));
                csv.WriteField(step.SteppedAt.ToString("O", CultureInfo.InvariantCulture));
                csv.WriteField(step.Request.Timestamp?.ToString("O", CultureInfo.InvariantCulture) ?? "");
                csv.WriteField(step.Request.Mode ?? StationStep.Auto);
                csv.WriteField(answer.ModelId);
                Numbers(csv, step.Request.Measurement, outputs, "measurement", mismatched);
                Numbers(csv, answer.AppliedInput, inputs, "applied input", mismatched);
                Numbers(csv, answer.FirstMove, inputs, "move", mismatched);
                Numbers(csv, answer.Estimate.State, states, "state estimate", mismatched);
                Numbers(csv, answer.Estimate.Disturbance, disturbances, "disturbance estimate", mismatched);
                csv.WriteField(answer.MissedSamples.ToString(CultureInfo.InvariantCulture));
                csv.WriteField(answer.Status);
                csv.WriteField(Message(answer, mismatched));
                csv.EndRecord();
            }

            csv.Flush();
        }

        return buffer.ToArray();
    }

    private static IEnumerable<string> Names(string[]? labels, int count, string prefix, string fallback) =>
        labels is { } given && given.Length == count
            ? given.Select(l => prefix + l)
            : Enumerable.Range(1, count).Select(i => $"{fallback}{i}");

    /// <summary>Writes <paramref name="count"/> cells: the values, or empty cells when absent or of another length.</summary>
    private static void Numbers(CsvWriter csv, double[]? values, int count, string what, List<string> mismatched)
    {
        bool fits = values is not null && values.Length == count;
        if (values is not null && !fits)
        {
            mismatched.Add(what);
        }

        for (int i = 0; i < count; i++)
        {
            csv.WriteField(fits ? values![i].ToString("R", CultureInfo.InvariantCulture) : "");
        }
    }

    private static string Message(StationStepResponse answer, List<string> mismatched)
    {
        var text = new StringBuilder();
        foreach (var warning in answer.Warnings)
        {
            text.Append(text.Length > 0 ? "; " : "").Append(warning.Code).Append(": ").Append(warning.Message);
        }

        if (mismatched.Count > 0)
        {
            text.Append(text.Length > 0 ? "; " : "").Append("taken with a model of other dimensions: ").AppendJoin(", ", mismatched).Append(" not shown");
        }

        return text.ToString();
    }
}
