using System.Text.Json;
using System.Text.RegularExpressions;

namespace Lookahead.Api.Http;

/// <summary>
/// Turns a <see cref="JsonException"/> into a path and a plain reason. The serializer's own messages name .NET
/// types; those are translated so nothing about the implementation leaks.
/// </summary>
public static partial class JsonErrorDescriber
{
    public const string UnknownField = "is not a known field (fields are case-sensitive; a misspelt field is refused rather than ignored)";

    public static JsonErrorDescription Describe(JsonException exception, int maxDepth)
    {
        string path = ToFieldPath(exception.Path);
        string reason;
        if (exception is JsonFieldException field)
        {
            path = Append(path, field.RelativePath);
            reason = field.Reason;
        }
        else if (exception.Message.Contains("could not be mapped to any .NET member", StringComparison.Ordinal))
        {
            var name = PropertyName().Match(exception.Message);
            if (name.Success && !path.EndsWith(name.Groups[1].Value, StringComparison.Ordinal))
            {
                path = Append(path, "." + name.Groups[1].Value);
            }

            reason = UnknownField;
        }
        else if (exception.Message.Contains("Duplicate", StringComparison.OrdinalIgnoreCase))
        {
            reason = "is given more than once";
        }
        else if (exception.Message.Contains("maximum configured depth", StringComparison.Ordinal))
        {
            reason = $"is nested too deeply (at most {maxDepth} levels)";
        }
        else if (ConvertedTo().Match(exception.Message) is { Success: true } converted)
        {
            reason = "must be " + Expected(converted.Groups[1].Value);
        }
        else
        {
            reason = "is not valid JSON: " + Trim(exception.Message);
        }

        long? line = exception.LineNumber is long l ? l + 1 : null;
        long? position = exception.BytePositionInLine is long b ? b + 1 : null;
        return new JsonErrorDescription(new ProblemError(path, reason), line, position);
    }

    /// <summary>"$.plant.a[0]" → "plant.a[0]"; "$" → ""; a name the serializer quotes ("$.plant['a b']") → "plant.a b".</summary>
    public static string ToFieldPath(string? jsonPath)
    {
        if (string.IsNullOrEmpty(jsonPath) || jsonPath == "$")
        {
            return "";
        }

        // Names with spaces, dots or quotes come as ['name'], which is not how the service writes paths.
        string dotted = QuotedName().Replace(jsonPath, m => "." + m.Groups[1].Value.Replace("\\'", "'", StringComparison.Ordinal));
        return dotted.StartsWith("$.", StringComparison.Ordinal) ? dotted[2..] : dotted.TrimStart('$');
    }

    private static string Append(string path, string relative) =>
        relative.Length == 0 ? path : path.Length == 0 ? relative.TrimStart('.') : path + relative;

    private static string Expected(string dotnetType) => dotnetType switch
    {
        "System.Double" or "System.Nullable`1[System.Double]" => "a number",
        "System.Int32" or "System.Nullable`1[System.Int32]" => "an integer",
        "System.String" => "a string",
        "System.Boolean" => "true or false",
        "System.Double[]" => "an array of numbers",
        "System.Double[][]" => "a matrix (an array of rows)",
        "System.String[]" => "an array of strings",
        _ when dotnetType.EndsWith("[]", StringComparison.Ordinal) || dotnetType.Contains("List", StringComparison.Ordinal) => "an array",
        _ => "an object",
    };

    private static string Trim(string message)
    {
        int cut = message.IndexOf(" Path:", StringComparison.Ordinal);
        if (cut < 0)
        {
            cut = message.IndexOf(" LineNumber:", StringComparison.Ordinal);
        }

        var text = (cut >= 0 ? message[..cut] : message).Trim().TrimEnd('|').Trim();
        return text.Replace("JSON value", "value", StringComparison.Ordinal);
    }

    [GeneratedRegex("could not be converted to ([^ .]+(?:\\.[^ .]+)*?)\\. ")]
    private static partial Regex ConvertedTo();

    [GeneratedRegex(@"\['((?:[^'\\]|\\.)*)'\]")]
    private static partial Regex QuotedName();

    [GeneratedRegex("The JSON property '([^']+)'")]
    private static partial Regex PropertyName();
}

/// <summary>Where a body failed to parse: the field, and the 1-based line and byte position.</summary>
public sealed record JsonErrorDescription(ProblemError Error, long? Line, long? Position);
