namespace Lookahead.Api.Tests.Hostile;

/// <summary>The raw JSON texts put where a number belongs, grouped by what the service must do with them.</summary>
public static class HostileValues
{
    /// <summary>Not JSON numbers at all (non-finite literals and broken spellings): the body is malformed.</summary>
    public static readonly string[] Malformed =
    [
        "NaN", "Infinity", "-Infinity", "nan", "+1", "1.", ".5", "01", "1e", "--1", "0x10",
    ];

    /// <summary>JSON numbers beyond double: they read as ±∞ and are refused as not finite, at their own path.</summary>
    public static readonly string[] Overflowing = ["1e400", "-1e400", "1e309"];

    /// <summary>Another kind of JSON value where a number belongs.</summary>
    public static readonly string[] WrongKinds = ["\"1\"", "\"NaN\"", "true", "{}", "[]", "[1]"];

    /// <summary>Finite but enormous: refused in a model (beyond its magnitude limit); a request may still be answered when nothing overflows.</summary>
    public static readonly string[] Huge = ["1e308", "-1e308", "1.7976931348623157e308"];

    /// <summary>Tiny: 1e-400 reads as 0 (the nearest double), 5e-324 is the smallest subnormal. Refused only where 0 or a subnormal is.</summary>
    public static readonly string[] Tiny = ["1e-400", "5e-324", "-5e-324"];

    /// <summary>Every value that a number in a request must be refused for, whatever the endpoint.</summary>
    public static IEnumerable<string> AlwaysRefused => Malformed.Concat(Overflowing).Concat(WrongKinds);

    /// <summary>Control characters (C0, DEL, C1) that a name or label must not carry.</summary>
    public static readonly string[] ControlCharacters = ["\u0000", "\u0001", "\u0009", "\u000a", "\u001b", "\u007f", "\u0085", "\u009b"];

    /// <summary>A value of another JSON kind than the original (an object, an array, a string or a number).</summary>
    public static string[] OtherKinds(System.Text.Json.JsonValueKind kind) => kind switch
    {
        System.Text.Json.JsonValueKind.Object => ["\"x\"", "1", "true", "[]"],
        System.Text.Json.JsonValueKind.Array => ["\"x\"", "1", "true", "{}"],
        System.Text.Json.JsonValueKind.String => ["1", "true", "[]", "{}"],
        _ => ["\"x\"", "true", "[]", "{}"],
    };
}
