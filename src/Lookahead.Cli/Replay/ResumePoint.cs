using System.Globalization;
using System.Text;
using CsvHelper;

namespace Lookahead.Cli.Replay;

/// <summary>
/// Where an earlier replay's output left off: its header, the result rows fully written (and how many were errors)
/// and the byte length to keep. A trailing summary record and a last line cut mid-write are not kept, so appending
/// after <see cref="KeepBytes"/> continues the file as if the run had never stopped.
/// </summary>
public sealed record ResumePoint(string[]? Header, long Rows, long FailedRows, long KeepBytes)
{
    public const string SummaryMarker = "#summary";

    public static ResumePoint None { get; } = new(null, 0, 0, 0);

    public static ResumePoint Read(string path, CsvDialect dialect)
    {
        string[]? header = null;
        int status = -1;
        long rows = 0, failed = 0, keep = 0;
        using var file = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16);
        var line = new List<byte>(256);
        long offset = 0;
        int b;
        while ((b = file.ReadByte()) >= 0)
        {
            offset++;
            if (b != '\n')
            {
                line.Add((byte)b);
                continue;
            }

            string text = Encoding.UTF8.GetString(line.ToArray()).TrimEnd('\r');
            line.Clear();
            if (header is null)
            {
                header = Fields(text, dialect);
                status = Array.IndexOf(header, "status");
                keep = offset;
            }
            else if (text.StartsWith(SummaryMarker, StringComparison.Ordinal))
            {
                // The summary closes a run; what follows it (nothing, normally) belongs to no run.
                break;
            }
            else if (text.Length > 0)
            {
                rows++;
                if (status >= 0 && text.Contains("error", StringComparison.Ordinal) && Fields(text, dialect) is { } fields && status < fields.Length && fields[status] == "error")
                {
                    failed++;
                }

                keep = offset;
            }
        }

        return new ResumePoint(header, rows, failed, keep);
    }

    private static string[] Fields(string line, CsvDialect dialect)
    {
        var options = new CsvReaderOptions
        {
            HasHeader = false,
            Separator = dialect.Delimiter,
            FieldCountMismatch = CsvFieldCountHandling.Allow,
            MissingField = CsvMissingFieldHandling.ReturnEmpty,
            FormatProvider = CultureInfo.InvariantCulture,
        };
        using var csv = CsvReader.Create(Encoding.UTF8.GetBytes(line), options);
        if (!csv.Read())
        {
            return [];
        }

        var fields = new string[csv.FieldCount];
        for (int i = 0; i < fields.Length; i++)
        {
            fields[i] = csv.GetString(i);
        }

        return fields;
    }
}
