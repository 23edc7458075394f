namespace Lookahead.Api.Tests.Deploy;

/// <summary>
/// One Dockerfile instruction: its keyword (upper case), its arguments with continuation lines joined, and the
/// physical lines it spans (1-based number and text after the keyword), so a key can be reported where it is written.
/// </summary>
public sealed record DockerfileInstruction(string Keyword, string Arguments, IReadOnlyList<(int Line, string Text)> PhysicalLines)
{
    /// <summary>
    /// Reads a Dockerfile as its instructions: comment and blank lines are skipped (also inside a continued
    /// instruction, as Docker does), a trailing backslash continues the instruction on the next line, and parser
    /// directives (<c># syntax=…</c>) are comments here.
    /// </summary>
    /// <exception cref="FormatException">A line that is not an instruction, or a file that ends inside one.</exception>
    public static IReadOnlyList<DockerfileInstruction> Parse(string text)
    {
        var lines = text.Replace("\r\n", "\n", StringComparison.Ordinal).Split('\n');
        var result = new List<DockerfileInstruction>();
        var parts = new List<(int Line, string Text)>();
        for (int i = 0; i < lines.Length; i++)
        {
            string line = lines[i];
            string trimmed = line.Trim();
            if (trimmed.Length == 0 || trimmed.StartsWith('#'))
            {
                continue;
            }

            bool continues = trimmed.EndsWith('\\');
            parts.Add((i + 1, continues ? trimmed[..^1].TrimEnd() : trimmed));
            if (continues)
            {
                continue;
            }

            result.Add(Build(parts));
            parts.Clear();
        }

        if (parts.Count > 0)
        {
            throw new FormatException($"line {parts[0].Line}: the file ends inside an instruction continued with '\\'");
        }

        return result;
    }

    /// <summary>
    /// The name=value pairs of an ENV instruction with the line each name is written on. Both forms are read:
    /// <c>ENV a=1 b="two words"</c> and the older <c>ENV a value with spaces</c>.
    /// </summary>
    public IEnumerable<(string Name, string Value, int Line)> EnvironmentPairs()
    {
        if (Keyword != "ENV")
        {
            throw new InvalidOperationException($"{Keyword} is not ENV");
        }

        var firstWords = Words(PhysicalLines[0].Text);
        if (firstWords.Count > 0 && !firstWords[0].Contains('=', StringComparison.Ordinal))
        {
            string name = firstWords[0];
            string value = Arguments[name.Length..].Trim();
            yield return (name, value, Line);
            yield break;
        }

        foreach (var (line, text) in PhysicalLines)
        {
            foreach (string word in Words(text))
            {
                int equals = word.IndexOf('=', StringComparison.Ordinal);
                if (equals <= 0)
                {
                    throw new FormatException($"line {line}: '{word}' is not name=value");
                }

                yield return (word[..equals], Unquote(word[(equals + 1)..]), line);
            }
        }
    }

    /// <summary>Splits on white space outside double or single quotes; quotes stay in the words.</summary>
    public static List<string> Words(string text)
    {
        var words = new List<string>();
        var current = new System.Text.StringBuilder();
        char quote = '\0';
        foreach (char c in text)
        {
            if (quote != '\0')
            {
                current.Append(c);
                if (c == quote)
                {
                    quote = '\0';
                }
            }
            else if (c is '"' or '\'')
            {
                quote = c;
                current.Append(c);
            }
            else if (char.IsWhiteSpace(c))
            {
                if (current.Length > 0)
                {
                    words.Add(current.ToString());
                    current.Clear();
                }
            }
            else
            {
                current.Append(c);
            }
        }

        if (quote != '\0')
        {
            throw new FormatException($"unbalanced {quote} in: {text}");
        }

        if (current.Length > 0)
        {
            words.Add(current.ToString());
        }

        return words;
    }

    public static string Unquote(string value) =>
        value.Length >= 2 && (value[0] is '"' or '\'') && value[^1] == value[0] ? value[1..^1] : value;

    /// <summary>The first physical line.</summary>
    public int Line => PhysicalLines[0].Line;

    private static DockerfileInstruction Build(List<(int Line, string Text)> parts)
    {
        var (start, first) = parts[0];
        int space = first.IndexOfAny([' ', '\t']);
        string keyword = space < 0 ? first : first[..space];
        if (keyword.Length == 0 || !keyword.All(char.IsAsciiLetter))
        {
            throw new FormatException($"line {start}: '{first}' does not start with an instruction");
        }

        var physical = new List<(int Line, string Text)>(parts) { [0] = (start, space < 0 ? "" : first[space..].Trim()) };
        return new DockerfileInstruction(keyword.ToUpperInvariant(), string.Join(' ', physical.Select(p => p.Text).Where(t => t.Length > 0)), physical);
    }
}
