using System.Globalization;
using CsvHelper;
using Lookahead.Cli.Commands;

namespace Lookahead.Cli.Replay;

/// <summary>
/// Reads a historian export in its own dialect and writes the CSV replay reads (comma-delimited, decimal point, tag
/// names mapped to labels) as it goes, so the upload is never held whole. Numbers are converted only in the columns
/// the replay reads; every other column (timestamps, tags, comments) passes through as written.
/// </summary>
public sealed class HistorianUpload : IAsyncDisposable
{
    private readonly FileStream input;
    private readonly CsvReader csv;
    private readonly CsvDialect dialect;
    private readonly bool[] convert;
    private long rowsSent;
    private long bytesRead;

    private HistorianUpload(FileStream input, CsvReader csv, CsvDialect dialect, string[] header, bool[] convert, IReadOnlyList<string> original)
    {
        this.input = input;
        this.csv = csv;
        this.dialect = dialect;
        this.convert = convert;
        Header = header;
        OriginalHeader = original;
        TotalBytes = input.Length;
    }

    /// <summary>The header as sent: tags mapped to labels.</summary>
    public string[] Header { get; }

    public IReadOnlyList<string> OriginalHeader { get; }

    public long TotalBytes { get; }

    public long RowsSent => Interlocked.Read(ref rowsSent);

    public long BytesRead => Interlocked.Read(ref bytesRead);

    /// <summary>Columns the service passes through to its answer: every column the replay does not read.</summary>
    public IReadOnlySet<string> PassThrough { get; private set; } = new HashSet<string>();

    public static async Task<HistorianUpload> OpenAsync(string path, CsvDialect dialect, TagMap tags, ModelColumns columns, CancellationToken cancellationToken)
    {
        FileStream input;
        try
        {
            input = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16, FileOptions.Asynchronous | FileOptions.SequentialScan);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw new CliInputException($"input '{path}' could not be read: {ex.Message}", ex);
        }

        var csv = CsvReader.Create(input, new CsvReaderOptions
        {
            HasHeader = true,
            Separator = dialect.Delimiter,
            FieldCountMismatch = CsvFieldCountHandling.Allow,
            MissingField = CsvMissingFieldHandling.ReturnEmpty,
            MalformedData = CsvMalformedDataHandling.Throw,
            FormatProvider = CultureInfo.InvariantCulture,
        }, leaveOpen: true);
        try
        {
            await csv.ReadHeaderAsync(cancellationToken);
            var original = csv.Headers?.ToArray() ?? [];
            if (original.Length == 0)
            {
                throw new CliInputException($"input '{path}' has no header line");
            }

            var header = tags.Apply(original);
            var convert = header.Select(name => dialect.DecimalComma && columns.Contains(name)).ToArray();
            return new HistorianUpload(input, csv, dialect, header, convert, original)
            {
                PassThrough = header.Where(name => !columns.Contains(name)).ToHashSet(StringComparer.Ordinal),
            };
        }
        catch
        {
            await csv.DisposeAsync();
            await input.DisposeAsync();
            throw;
        }
    }

    /// <summary>Writes the header and every row after the first <paramref name="skip"/> (already in the output), then flushes.</summary>
    public async Task WriteAsync(Stream destination, long skip, CancellationToken cancellationToken)
    {
        await using var writer = CsvWriter.Create(destination, new CsvWriterOptions
        {
            Separator = ',',
            NewLine = "\n",
            FormatProvider = CultureInfo.InvariantCulture,
            Injection = CsvInjection.None,
            ValidateFieldCount = false,
        }, leaveOpen: true);
        foreach (string name in Header)
        {
            writer.WriteField(name);
        }

        await writer.EndRecordAsync(cancellationToken);
        for (long skipped = 0; skipped < skip; skipped++)
        {
            if (!await csv.ReadAsync(cancellationToken))
            {
                throw new CliInputException($"the output already holds {skip} rows but the input has only {skipped}: is it the output of another input?");
            }
        }

        while (await csv.ReadAsync(cancellationToken))
        {
            int fields = csv.FieldCount;
            for (int i = 0; i < fields; i++)
            {
                string field = csv.GetString(i);
                writer.WriteField(i < convert.Length && convert[i] ? field.Replace(',', '.') : field);
            }

            await writer.EndRecordAsync(cancellationToken);
            Interlocked.Increment(ref rowsSent);
            Interlocked.Exchange(ref bytesRead, input.Position);
        }

        await writer.FlushAsync(cancellationToken);
        Interlocked.Exchange(ref bytesRead, TotalBytes);
    }

    /// <summary>The dialect the rows are read in.</summary>
    public CsvDialect Dialect => dialect;

    public async ValueTask DisposeAsync()
    {
        await csv.DisposeAsync();
        await input.DisposeAsync();
    }
}
