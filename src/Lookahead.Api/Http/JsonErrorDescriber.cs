using System.Text.Json;
using System.Text.Json.Serialization.Metadata;
using System.Text.RegularExpressions;

namespace Lookahead.Api.Http;

/// <summary>
/// Turns a <see cref="JsonException"/> into a path and a plain reason. The serializer's own messages name .NET
/// types and reader options; those are translated so nothing about the implementation leaks. A body that is valid
/// JSON of the wrong shape (a string where a number goes, an unknown or repeated member) is told apart from one that
/// is not JSON at all: the first is a validation problem on its field, only the second is "malformed JSON".
/// </summary>
public static partial class JsonErrorDescriber
{
    public const string UnknownField = "is not a known field (fields are case-sensitive; a misspelt field is refused rather than ignored)";

    /// <param name="exception">What the serializer or one of our converters threw.</param>
    /// <param name="maxDepth">The configured nesting limit, for the sentence.</param>
    /// <param name="root">The type the body was read as, when known: an unknown member then gets the closest known name as a hint.</param>
    public static JsonErrorDescription Describe(JsonException exception, int maxDepth, JsonTypeInfo? root = null)
    {
        string path = ToFieldPath(exception.Path);
        string reason;
        bool syntax = false;
        if (exception is JsonFieldException field)
        {
            path = Append(path, field.RelativePath);
            reason = field.Reason;
        }
        else if (exception.Message.Contains("could not be mapped to any .NET member", StringComparison.Ordinal))
        {
            var name = PropertyName().Match(exception.Message);
            string parent = path;
            if (name.Success)
            {
                string member = name.Groups[1].Value;
                if (path.EndsWith(member, StringComparison.Ordinal))
                {
                    parent = path.Length > member.Length ? path[..(path.Length - member.Length)].TrimEnd('.') : "";
                }
                else
                {
                    path = Append(path, "." + member);
                }

                var known = root is null ? null : JsonMemberNames.At(root, parent);
                reason = known is null ? UnknownField : DidYouMean.UnknownFieldReason(member, known);
            }
            else
            {
                reason = UnknownField;
            }
        }
        else if (exception.Message.Contains("Duplicate", StringComparison.OrdinalIgnoreCase))
        {
            reason = "is given more than once";
        }
        else if (exception.Message.Contains("maximum configured depth", StringComparison.Ordinal))
        {
            reason = $"is nested too deeply (at most {maxDepth} levels)";
            syntax = true;
        }
        else if (ConvertedTo().Match(exception.Message) is { Success: true } converted)
        {
            // The serializer may name the enclosing record rather than the member; the metadata knows the member's type.
            var member = root is null ? null : JsonMemberNames.TypeAt(root, path);
            reason = "must be " + Expected(member?.Type.ToString() ?? converted.Groups[1].Value);
        }
        else
        {
            reason = SyntaxReason(exception.Message);
            syntax = true;
        }

        long? line = exception.LineNumber is long l ? l + 1 : null;
        long? position = exception.BytePositionInLine is long b ? b + 1 : null;
        return new JsonErrorDescription(new ProblemError(path, reason), line, position, syntax);
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

    /// <summary>The reader's complaint in our words where we have them; otherwise its sentence without the advice about reader options.</summary>
    private static string SyntaxReason(string message)
    {
        if (message.Contains("trailing comma", StringComparison.OrdinalIgnoreCase))
        {
            return message.Contains("array", StringComparison.OrdinalIgnoreCase)
                ? "is not valid JSON: a comma after the last entry of an array (JSON allows none there; remove it)"
                : "is not valid JSON: a comma after the last member of an object (JSON allows none there; remove it)";
        }

        if (message.Contains("comment", StringComparison.OrdinalIgnoreCase))
        {
            return "is not valid JSON: comments are not allowed";
        }

        return "is not valid JSON: " + Trim(message);
    }

    private static string Append(string path, string relative) =>
        relative.Length == 0 ? path : path.Length == 0 ? relative.TrimStart('.') : path + relative;

    private static string Expected(string dotnetType)
    {
        string type = dotnetType.Replace("System.Nullable`1", "", StringComparison.Ordinal);
        return type switch
        {
            _ when type.Contains("[][]", StringComparison.Ordinal) => "a matrix (an array of rows)",
            _ when type.Contains("Double[]", StringComparison.Ordinal) => "an array of numbers",
            _ when type.Contains("String[]", StringComparison.Ordinal) => "an array of strings",
            _ when type.EndsWith("[]", StringComparison.Ordinal) || type.Contains("List", StringComparison.Ordinal) => "an array",
            _ when type.Contains("Double", StringComparison.Ordinal) => "a number",
            _ when type.Contains("Int32", StringComparison.Ordinal) || type.Contains("Int64", StringComparison.Ordinal) => "an integer",
            _ when type.Contains("DateTimeOffset", StringComparison.Ordinal) => "an ISO 8601 timestamp",
            _ when type.Contains("String", StringComparison.Ordinal) => "a string",
            _ when type.Contains("Boolean", StringComparison.Ordinal) => "true or false",
            _ => "an object",
        };
    }

    private static string Trim(string message)
    {
        int cut = message.IndexOf(" Path:", StringComparison.Ordinal);
        if (cut < 0)
        {
            cut = message.IndexOf(" LineNumber:", StringComparison.Ordinal);
        }

        var text = (cut >= 0 ? message[..cut] : message).Trim().TrimEnd('|').Trim();
        text = text.Replace("Change the reader options.", "", StringComparison.Ordinal).Trim();
        return text.Replace("JSON value", "value", StringComparison.Ordinal);
    }

    [GeneratedRegex("could not be converted to (.+?)\\. (?:Path|LineNumber|$)")]
    private static partial Regex ConvertedTo();

    [GeneratedRegex(@"\['((?:[^'\\]|\\.)*)'\]")]
    private static partial Regex QuotedName();

    [GeneratedRegex("The JSON property '([^']+)'")]
    private static partial Regex PropertyName();
}

/// <summary>
/// Where a body failed to parse: the field, the 1-based line and byte position, and whether the body is not JSON at
/// all (<see cref="IsSyntax"/>) rather than JSON of the wrong shape.
/// </summary>
public sealed record JsonErrorDescription(ProblemError Error, long? Line, long? Position, bool IsSyntax = true);
