using System.Text;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>
/// An nginx configuration read as nginx reads its syntax: words separated by white space, a directive ends with ';'
/// or opens a block with '{' closed by '}', '#' starts a comment, quotes group words. Enough to reject unbalanced
/// braces and unterminated directives, and to look up upstreams and proxy targets; not a check of directive names.
/// </summary>
public sealed record NginxDirective(string Name, IReadOnlyList<string> Arguments, int Line, IReadOnlyList<NginxDirective>? Block)
{
    /// <exception cref="FormatException">Unbalanced braces, a directive without ';', or an unclosed quote, with its line.</exception>
    public static IReadOnlyList<NginxDirective> Parse(string text)
    {
        var stack = new Stack<(List<NginxDirective> Children, List<string> Words, int Line)>();
        var children = new List<NginxDirective>();
        var words = new List<string>();
        int wordsLine = 0;
        int line = 1;
        var word = new StringBuilder();
        char quote = '\0';

        void EndWord()
        {
            if (word.Length > 0 || quote != '\0')
            {
                if (words.Count == 0)
                {
                    wordsLine = line;
                }

                words.Add(word.ToString());
                word.Clear();
            }
        }

        for (int i = 0; i < text.Length; i++)
        {
            char c = text[i];
            if (quote != '\0')
            {
                if (c == '\\' && i + 1 < text.Length)
                {
                    word.Append(text[++i]);
                }
                else if (c == quote)
                {
                    if (words.Count == 0)
                    {
                        wordsLine = line;
                    }

                    words.Add(word.ToString());
                    word.Clear();
                    quote = '\0';
                }
                else
                {
                    word.Append(c);
                }

                if (c == '\n')
                {
                    line++;
                }

                continue;
            }

            switch (c)
            {
                case '\n':
                    EndWord();
                    line++;
                    break;
                case '#':
                    EndWord();
                    while (i + 1 < text.Length && text[i + 1] != '\n')
                    {
                        i++;
                    }

                    break;
                case '"' or '\'' when word.Length == 0:
                    quote = c;
                    break;
                case ';':
                    EndWord();
                    if (words.Count == 0)
                    {
                        throw new FormatException($"line {line}: ';' without a directive");
                    }

                    children.Add(new NginxDirective(words[0], words[1..], wordsLine, null));
                    words = [];
                    break;
                case '{':
                    EndWord();
                    if (words.Count == 0)
                    {
                        throw new FormatException($"line {line}: '{{' without a directive");
                    }

                    stack.Push((children, words, wordsLine));
                    children = [];
                    words = [];
                    break;
                case '}':
                    EndWord();
                    if (words.Count > 0)
                    {
                        throw new FormatException($"line {wordsLine}: '{words[0]}' is not ended by ';' before '}}'");
                    }

                    if (stack.Count == 0)
                    {
                        throw new FormatException($"line {line}: '}}' closes no block");
                    }

                    var (outer, header, headerLine) = stack.Pop();
                    outer.Add(new NginxDirective(header[0], header[1..], headerLine, children));
                    children = outer;
                    break;
                default:
                    if (char.IsWhiteSpace(c))
                    {
                        EndWord();
                    }
                    else
                    {
                        word.Append(c);
                    }

                    break;
            }
        }

        if (quote != '\0')
        {
            throw new FormatException($"line {line}: unclosed {quote}");
        }

        EndWord();
        if (words.Count > 0)
        {
            throw new FormatException($"line {wordsLine}: '{words[0]}' is not ended by ';'");
        }

        if (stack.Count > 0)
        {
            var (_, header, headerLine) = stack.Peek();
            throw new FormatException($"line {headerLine}: the block '{string.Join(' ', header)}' is never closed");
        }

        return children;
    }

    /// <summary>This directive and every directive nested in its blocks, depth first.</summary>
    public static IEnumerable<NginxDirective> All(IEnumerable<NginxDirective> directives) =>
        directives.SelectMany(d => new[] { d }.Concat(All(d.Block ?? [])));
}
