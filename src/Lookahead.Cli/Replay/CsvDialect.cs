namespace Lookahead.Cli.Replay;

/// <summary>How a historian writes its CSV: the field delimiter and whether numbers carry a decimal comma.</summary>
public sealed record CsvDialect(char Delimiter, bool DecimalComma)
{
    public static CsvDialect Standard { get; } = new(',', false);

    public override string ToString() =>
        $"delimiter '{(Delimiter == '\t' ? "\\t" : Delimiter.ToString())}', decimal {(DecimalComma ? "comma" : "point")}";

    /// <summary>"," ";" "|" "tab" or "\t" as given on the command line.</summary>
    public static char? ParseDelimiter(string? text) => text switch
    {
        null => null,
        "tab" or "\\t" or "\t" => '\t',
        { Length: 1 } single when single is "," or ";" or "|" => single[0],
        _ => throw new Commands.CliInputException($"--delimiter: '{text}' is not one of , ; | tab"),
    };
}
