using System.Text.Json;

namespace Lookahead.Api.Http;

/// <summary>Strings read by hand from a <see cref="Utf8JsonReader"/> (the plan, estimation-row and replay parsers).</summary>
public static class JsonText
{
    /// <summary>
    /// The current string or member name. Text that is not valid UTF-8, or escapes a lone surrogate ("\ud800"), cannot
    /// become a string: the serializer reports that as malformed JSON, but a reader used by hand throws
    /// InvalidOperationException, which would escape as a 500. It is made the same malformed-JSON refusal here.
    /// </summary>
    public static string GetString(ref Utf8JsonReader reader)
    {
        try
        {
            return reader.GetString() ?? "";
        }
        catch (InvalidOperationException invalid) when (reader.TokenType is JsonTokenType.String or JsonTokenType.PropertyName)
        {
            throw new JsonException("a string is not valid Unicode text (bytes that are not UTF-8, or an escaped lone surrogate)", invalid);
        }
    }

    /// <summary>
    /// Refuses a member name that is not text before it is compared: comparing an escaped name unescapes it, and an
    /// escaped lone surrogate throws there. Names without escapes are compared as bytes and cannot throw.
    /// </summary>
    public static void CheckName(ref Utf8JsonReader reader)
    {
        if (reader.ValueIsEscaped)
        {
            _ = GetString(ref reader);
        }
    }
}
