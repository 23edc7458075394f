using Lookahead.Cli.Commands;

namespace Lookahead.Cli.Replay;

/// <summary>
/// Historian tag names to the column names replay reads (state labels, <c>prev_…</c>, <c>y_…</c>, …). Read from a
/// small file of <c>tag=label</c> lines (blank lines and lines starting with # are skipped) and from repeated
/// <c>--map tag=label</c> options, which win over the file.
/// </summary>
public sealed class TagMap
{
    private readonly Dictionary<string, string> map;

    private TagMap(Dictionary<string, string> map) => this.map = map;

    public int Count => map.Count;

    public static TagMap Load(string? file, IEnumerable<string>? options)
    {
        var map = new Dictionary<string, string>(StringComparer.Ordinal);
        if (file is not null)
        {
            int number = 0;
            foreach (string raw in Arguments.ReadFile(file, "mapping file").Split('\n'))
            {
                number++;
                string line = raw.Trim();
                if (line.Length == 0 || line.StartsWith('#'))
                {
                    continue;
                }

                Add(map, line, $"mapping file '{file}' line {number}");
            }
        }

        foreach (string option in options ?? [])
        {
            Add(map, option, "--map");
        }

        return new TagMap(map);
    }

    private static void Add(Dictionary<string, string> map, string entry, string where)
    {
        int eq = entry.LastIndexOf('=');
        if (eq <= 0 || eq == entry.Length - 1)
        {
            throw new CliInputException($"{where}: '{entry}' is not tag=label");
        }

        map[entry[..eq].Trim()] = entry[(eq + 1)..].Trim();
    }

    /// <summary>The header with mapped names; two columns ending with one name is a mistake, named.</summary>
    public string[] Apply(IReadOnlyList<string> header)
    {
        var names = header.Select(h => map.TryGetValue(h, out string? label) ? label : h).ToArray();
        var duplicate = names.GroupBy(n => n, StringComparer.Ordinal).FirstOrDefault(g => g.Count() > 1);
        if (duplicate is not null)
        {
            throw new CliInputException($"two columns would both be named '{duplicate.Key}' after mapping tags to labels");
        }

        return names;
    }

    /// <summary>Tags in the map that the header does not have (probably misspelt).</summary>
    public IEnumerable<string> Unused(IReadOnlyList<string> header) => map.Keys.Where(tag => !header.Contains(tag, StringComparer.Ordinal));
}
