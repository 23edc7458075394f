using System.Text;
using System.Text.RegularExpressions;

namespace Lookahead.Cli.Replay;

/// <summary>
/// Guesses a CSV's dialect from its first lines. The delimiter is the candidate (, ; tab |) that splits the header
/// into the most fields and splits every sampled line into at least as many (tag names seldom hold delimiters; a
/// decimal comma makes data lines hold more commas than the header). A decimal comma is assumed when the delimiter
/// is not a comma and some field reads as digits, a comma and digits while none reads with a decimal point.
/// </summary>
public static partial class DialectSniffer
{
    private const int SampleLines = 50;
    private static readonly char[] Candidates = [',', ';', '\t', '|'];

    public static CsvDialect Sniff(string path)
    {
        var lines = new List<string>();
        using (var reader = new StreamReader(path, Encoding.UTF8, detectEncodingFromByteOrderMarks: true))
        {
            while (lines.Count < SampleLines && reader.ReadLine() is { } line)
            {
                if (line.Length > 0)
                {
                    lines.Add(line);
                }
            }
        }

        return Sniff(lines);
    }

    public static CsvDialect Sniff(IReadOnlyList<string> lines)
    {
        if (lines.Count == 0)
        {
            return CsvDialect.Standard;
        }

        char delimiter = ',';
        int best = 0;
        foreach (char candidate in Candidates)
        {
            int headerFields = Count(lines[0], candidate);
            if (headerFields > best && lines.Skip(1).All(line => Count(line, candidate) >= headerFields))
            {
                best = headerFields;
                delimiter = candidate;
            }
        }

        if (delimiter == ',')
        {
            return CsvDialect.Standard;
        }

        var fields = lines.Skip(1).SelectMany(line => line.Split(delimiter)).Select(f => f.Trim().Trim('"')).ToList();
        bool comma = fields.Any(f => DecimalCommaNumber().IsMatch(f));
        bool point = fields.Any(f => DecimalPointNumber().IsMatch(f));
        return new CsvDialect(delimiter, comma && !point);
    }

    private static int Count(string line, char delimiter) => line.Count(c => c == delimiter);

    [GeneratedRegex(@"^[+-]?\d+,\d+([eE][+-]?\d+)?$")]
    private static partial Regex DecimalCommaNumber();

    [GeneratedRegex(@"^[+-]?\d+\.\d+([eE][+-]?\d+)?$")]
    private static partial Regex DecimalPointNumber();
}
