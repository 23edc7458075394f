using System.Globalization;
using System.Text;
using CsvHelper;
using Lookahead.Api.Http;

namespace Lookahead.Api.Replay;

/// <summary>
/// Pass-through columns, then the first move (one column per input), the estimate in an estimation replay (xhat…,
/// dhat…), cost, status and message (the errors of a bad row, or the warnings of the estimate and of a plan that is not
/// a clean optimum). Numbers are formatted on the planning threads;
/// CsvHelper quotes and writes, one batch at a time, into a buffer that is then copied to the response.
/// </summary>
internal sealed class CsvSink : IReplaySink, IAsyncDisposable
{
    private readonly Stream body;
    private readonly CsvLayout layout;
    private readonly MemoryStream buffer = new();
    private readonly CsvWriter csv;

    public CsvSink(Stream body, CsvLayout layout)
    {
        this.body = body;
        this.layout = layout;
        csv = CsvWriter.Create(buffer, new CsvWriterOptions { NewLine = "\n", FormatProvider = CultureInfo.InvariantCulture, Injection = CsvInjection.None }, leaveOpen: true);
    }

    public async ValueTask StartAsync(CancellationToken cancellationToken)
    {
        foreach (var name in layout.PassThroughNames)
        {
            csv.WriteField(name);
        }

        foreach (var name in layout.MoveNames.Concat(layout.EstimateNames))
        {
            csv.WriteField(name);
        }

        csv.WriteField(CsvLayout.CostColumn);
        csv.WriteField(CsvLayout.StatusColumn);
        csv.WriteField(CsvLayout.MessageColumn);
        csv.EndRecord();
        await CopyOutAsync(cancellationToken);
    }

    /// <summary>CSV carries the first move only.</summary>
    public bool NeedsFullPlan => false;

    public void Format(ReplayRow row, System.Text.Json.Utf8JsonWriter scratch)
    {
        if (row.Outcome is not { } outcome)
        {
            return;
        }

        foreach (double u in row.FirstMove)
        {
            FormatNumber(row, u);
        }

        if (row.Estimate is { } estimate)
        {
            foreach (double x in estimate.State)
            {
                FormatNumber(row, x);
            }

            foreach (double d in estimate.Disturbance)
            {
                FormatNumber(row, d);
            }
        }

        FormatNumber(row, outcome.Cost);
    }

    public async ValueTask WriteAsync(ReplayBatch batch, CancellationToken cancellationToken)
    {
        for (int r = 0; r < batch.Count; r++)
        {
            var row = batch[r];
            foreach (int column in layout.PassThrough)
            {
                csv.WriteField(row.Field(column));
            }

            if (row.Outcome is { } outcome)
            {
                foreach (var (start, length) in row.OutputFields)
                {
                    csv.WriteField(row.Output.WrittenSpan.Slice(start, length));
                }

                csv.WriteField(WireNames.Status(outcome.Status));
                csv.WriteField(Describe(row.EstimationWarnings, outcome.Warnings));
            }
            else
            {
                for (int i = 0; i <= layout.MoveNames.Length + layout.EstimateNames.Length; i++)
                {
                    csv.WriteField(""u8);
                }

                csv.WriteField("error");
                csv.WriteField(Describe(row));
            }

            csv.EndRecord();
        }

        await CopyOutAsync(cancellationToken);
    }

    /// <summary>
    /// The last record is the summary: <c>#summary,rows=…,failedRows=…,complete=true|false</c>, padded with empty
    /// fields to the header's width so that readers which insist on one width still read it (every header has at
    /// least four columns: a move, cost, status, message). A reader told that '#' starts a comment skips it.
    /// </summary>
    public async ValueTask CompleteAsync(ReplaySummary summary, CancellationToken cancellationToken)
    {
        string[] fields =
        [
            SummaryMarker,
            FormattableString.Invariant($"rows={summary.Rows}"),
            FormattableString.Invariant($"failedRows={summary.FailedRows}"),
            summary.Complete ? "complete=true" : "complete=false",
        ];
        int width = layout.PassThroughNames.Length + layout.MoveNames.Length + layout.EstimateNames.Length + 3;
        for (int i = 0; i < Math.Max(width, fields.Length); i++)
        {
            csv.WriteField(i < fields.Length ? fields[i] : "");
        }

        csv.EndRecord();
        await CopyOutAsync(cancellationToken);
    }

    /// <summary>First field of the summary record, always the last record of the answer.</summary>
    public const string SummaryMarker = "#summary";

    public async ValueTask DisposeAsync()
    {
        await csv.DisposeAsync();
        await buffer.DisposeAsync();
    }

    private static void FormatNumber(ReplayRow row, double value)
    {
        int start = row.Output.WrittenCount;
        var span = row.Output.GetSpan(32);
        value.TryFormat(span, out int written, "R", CultureInfo.InvariantCulture);
        row.Output.Advance(written);
        row.OutputFields.Add((start, written));
    }

    /// <summary>The message column of a planned row: each warning (the estimator's first) as "code: sentence", separated by "; ".</summary>
    private static string Describe(IReadOnlyList<Lookahead.Core.Planning.Warning> estimation, IReadOnlyList<Lookahead.Core.Planning.Warning> plan)
    {
        if (estimation.Count == 0 && plan.Count == 0)
        {
            return "";
        }

        var text = new StringBuilder();
        foreach (var warning in estimation.Concat(plan))
        {
            if (text.Length > 0)
            {
                text.Append("; ");
            }

            text.Append(WireNames.Warning(warning.Code)).Append(": ").Append(WarningText.Message(warning));
        }

        return text.ToString();
    }

    private static string Describe(ReplayRow row)
    {
        var text = new StringBuilder($"row {row.Number}: ");
        for (int i = 0; i < row.Errors.Count; i++)
        {
            if (i > 0)
            {
                text.Append("; ");
            }

            var e = row.Errors[i];
            text.Append(e.Path.Length > 0 ? $"{e.Path}: {e.Reason}" : e.Reason);
        }

        return text.ToString();
    }

    private async Task CopyOutAsync(CancellationToken cancellationToken)
    {
        csv.Flush();
        await body.WriteAsync(buffer.GetBuffer().AsMemory(0, (int)buffer.Length), cancellationToken);
        await body.FlushAsync(cancellationToken);
        buffer.SetLength(0);
    }
}
