using System.Globalization;
using CsvHelper;
using Lookahead.Cli.Commands;
using Lookahead.Client;

namespace Lookahead.Cli.Replay;

/// <summary>
/// The answers written to the output file in the input's dialect: pass-through columns as they came, the numbers the
/// service computed with the input's decimal separator, and the closing summary record. Opened at a
/// <see cref="ResumePoint"/>, it appends after the rows already there.
/// </summary>
public sealed class ReplayOutput : IAsyncDisposable
{
    private readonly FileStream file;
    private readonly CsvWriter csv;
    private readonly CsvDialect dialect;
    private readonly IReadOnlySet<string> passThrough;
    private readonly long rowOffset;
    private string[]? header;
    private bool[]? convert;
    private int messageColumn = -1;

    private ReplayOutput(FileStream file, CsvWriter csv, CsvDialect dialect, IReadOnlySet<string> passThrough, string[]? header, long rowOffset)
    {
        this.rowOffset = rowOffset;
        this.file = file;
        this.csv = csv;
        this.dialect = dialect;
        this.passThrough = passThrough;
        this.header = header;
    }

    public static ReplayOutput Open(string path, CsvDialect dialect, ResumePoint resume, IReadOnlySet<string> passThrough)
    {
        var file = new FileStream(path, FileMode.OpenOrCreate, FileAccess.Write, FileShare.Read, 1 << 16, FileOptions.Asynchronous);
        file.SetLength(resume.KeepBytes);
        file.Seek(0, SeekOrigin.End);
        var csv = CsvWriter.Create(file, new CsvWriterOptions
        {
            Separator = dialect.Delimiter,
            NewLine = "\n",
            FormatProvider = CultureInfo.InvariantCulture,
            Injection = CsvInjection.None,
            ValidateFieldCount = false,
        }, leaveOpen: true);
        return new ReplayOutput(file, csv, dialect, passThrough, resume.Header, resume.Rows);
    }

    public async Task WriteAsync(CsvReplayRecord record, CancellationToken cancellationToken)
    {
        if (convert is null)
        {
            var answer = record.Header.ToArray();
            if (header is null)
            {
                header = answer;
                foreach (string name in header)
                {
                    csv.WriteField(name);
                }

                await csv.EndRecordAsync(cancellationToken);
            }
            else if (!header.SequenceEqual(answer, StringComparer.Ordinal))
            {
                throw new CliInputException($"the output's header ({string.Join(dialect.Delimiter, header)}) is not the one this replay answers with ({string.Join(dialect.Delimiter, answer)}): resume into the output of the same input, model and mapping");
            }

            convert = answer.Select(name => dialect.DecimalComma && !passThrough.Contains(name) && name is not "status" and not "message").ToArray();
            messageColumn = Array.IndexOf(answer, "message");
        }

        for (int i = 0; i < record.Fields.Count; i++)
        {
            string field = i == messageColumn ? InputRowNumbers(record.Fields[i], record.Row) : record.Fields[i];
            csv.WriteField(i < convert.Length && convert[i] ? field.Replace('.', ',') : field);
        }

        await csv.EndRecordAsync(cancellationToken);
    }

    /// <summary>
    /// The service numbers rows from the start of this upload; after a resume the upload starts past the rows already
    /// written, so an error's "row N:" is moved on to count rows of the input file, as an uninterrupted run would.
    /// </summary>
    private string InputRowNumbers(string message, long row)
    {
        string prefix = FormattableString.Invariant($"row {row}: ");
        return rowOffset > 0 && message.StartsWith(prefix, StringComparison.Ordinal)
            ? FormattableString.Invariant($"row {row + rowOffset}: ") + message[prefix.Length..]
            : message;
    }

    /// <summary>The closing record, as the service writes it, counting every row of the output (earlier runs included).</summary>
    public async Task WriteSummaryAsync(long rows, long failedRows, bool complete, CancellationToken cancellationToken)
    {
        string[] fields =
        [
            ResumePoint.SummaryMarker,
            FormattableString.Invariant($"rows={rows}"),
            FormattableString.Invariant($"failedRows={failedRows}"),
            complete ? "complete=true" : "complete=false",
        ];
        int width = Math.Max(fields.Length, header?.Length ?? 0);
        for (int i = 0; i < width; i++)
        {
            csv.WriteField(i < fields.Length ? fields[i] : "");
        }

        await csv.EndRecordAsync(cancellationToken);
    }

    public async ValueTask DisposeAsync()
    {
        await csv.FlushAsync(CancellationToken.None);
        await csv.DisposeAsync();
        await file.DisposeAsync();
    }
}
