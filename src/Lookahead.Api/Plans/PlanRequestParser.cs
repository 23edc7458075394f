using System.Text.Json;
using Lookahead.Api.Http;

namespace Lookahead.Api.Plans;

/// <summary>
/// The one parser of a plan request ({ "state", "reference"?, "previousInput"? }), for /plan, alias plans and
/// JSON and NDJSON replay rows. It reads straight into the call's preallocated vectors with Utf8JsonReader: no DTO,
/// no intermediate arrays, and a wrong length is found without growing anything.
/// </summary>
public static class PlanRequestParser
{
    /// <param name="json">The request's bytes.</param>
    /// <param name="row">Receives the vectors, or the errors with their paths.</param>
    /// <param name="pathPrefix">Prepended to every error path ("" for /plan, "requests[3]." inside a replay body).</param>
    /// <param name="maxDepth">Deepest nesting accepted.</param>
    public static void Parse(ReadOnlySpan<byte> json, PlanCall row, string pathPrefix, int maxDepth)
    {
        var reader = new Utf8JsonReader(json, new JsonReaderOptions { MaxDepth = maxDepth });
        try
        {
            if (!reader.Read() || reader.TokenType != JsonTokenType.StartObject)
            {
                row.AddError(Trimmed(pathPrefix), "must be an object with a 'state' array");
                return;
            }

            bool sawState = false, sawReference = false, sawPrevious = false;
            while (reader.Read() && reader.TokenType == JsonTokenType.PropertyName)
            {
                if (reader.ValueTextEquals("state"u8))
                {
                    Duplicate(ref sawState, row, pathPrefix + "state");
                    reader.Read();
                    if (!ReadVector(ref reader, row.State, pathPrefix + "state", row))
                    {
                        row.AddError(pathPrefix + "state", "is required");
                    }
                }
                else if (reader.ValueTextEquals("reference"u8))
                {
                    Duplicate(ref sawReference, row, pathPrefix + "reference");
                    reader.Read();
                    row.HasReference = ReadVector(ref reader, row.Reference, pathPrefix + "reference", row);
                }
                else if (reader.ValueTextEquals("previousInput"u8))
                {
                    Duplicate(ref sawPrevious, row, pathPrefix + "previousInput");
                    reader.Read();
                    row.HasPreviousInput = ReadVector(ref reader, row.PreviousInput, pathPrefix + "previousInput", row);
                }
                else
                {
                    row.AddError(pathPrefix + reader.GetString(), JsonErrorDescriber.UnknownField);
                    reader.Read();
                    reader.Skip();
                }
            }

            if (reader.Read())
            {
                row.AddError(Trimmed(pathPrefix), "has content after the end of the object");
            }

            if (!sawState)
            {
                row.AddError(pathPrefix + "state", "is required");
            }
        }
        catch (JsonException ex)
        {
            var description = JsonErrorDescriber.Describe(ex, maxDepth);
            row.AddError(Trimmed(pathPrefix), description.Error.Reason);
            row.SyntaxErrorAt = (description.Line ?? 1, description.Position ?? 1);
        }
    }

    /// <summary>Reads an array into <paramref name="target"/>; false for null (absent). Length and entries are checked.</summary>
    private static bool ReadVector(ref Utf8JsonReader reader, double[] target, string path, PlanCall row)
    {
        if (reader.TokenType == JsonTokenType.Null)
        {
            return false;
        }

        if (reader.TokenType != JsonTokenType.StartArray)
        {
            row.AddError(path, "must be an array of numbers");
            reader.Skip();
            return true;
        }

        int count = 0;
        while (reader.Read() && reader.TokenType != JsonTokenType.EndArray)
        {
            if (reader.TokenType == JsonTokenType.Number && reader.TryGetDouble(out double value) && double.IsFinite(value))
            {
                if (count < target.Length)
                {
                    target[count] = value;
                }
            }
            else
            {
                row.AddError($"{path}[{count}]", "must be a finite number");
                reader.Skip();
            }

            count++;
        }

        if (count != target.Length)
        {
            row.AddError(path, $"has {count} entries; expected {target.Length}");
        }

        return true;
    }

    private static void Duplicate(ref bool seen, PlanCall row, string path)
    {
        if (seen)
        {
            row.AddError(path, "is given more than once");
        }

        seen = true;
    }

    private static string Trimmed(string prefix) => prefix.TrimEnd('.');
}
