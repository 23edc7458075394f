using System.Text.RegularExpressions;

namespace Lookahead.Api.Catalog;

/// <summary>Alias names are short, lower-case and URL-safe so they can sit in a station's configuration unquoted.</summary>
public static partial class AliasName
{
    public const string Pattern = "^[a-z0-9][a-z0-9._-]{0,63}$";

    public static bool IsWellFormed(string? name) => name is not null && Regex().IsMatch(name);

    [GeneratedRegex(Pattern, RegexOptions.CultureInvariant)]
    private static partial Regex Regex();
}
