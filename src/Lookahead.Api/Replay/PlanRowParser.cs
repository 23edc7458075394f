using System.Text.Json;

namespace Lookahead.Api.Replay;

/// <summary>
/// Parses one replay request ({ "state", "reference"?, "previousInput"? }) straight into the row's preallocated
/// vectors with Utf8JsonReader: no DTO, no intermediate arrays, and a wrong length is found without growing anything.
/// </summary>
internal static class PlanRowParser
{
    public static void Parse(ReplayRow row, string pathPrefix, int maxDepth)
    {
        var reader = new Utf8JsonReader(row.RawSpan, new JsonReaderOptions { MaxDepth = maxDepth });
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
                    row.AddError(pathPrefix + reader.GetString(), "is not a known field (fields are case-sensitive)");
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
            row.AddError(Trimmed(pathPrefix), "is not valid JSON: " + ex.Message.Split(" LineNumber", 2)[0].Trim());
        }
    }

    /// <summary>Reads an array into <paramref name="target"/>; false for null (absent). Length and entries are checked.</summary>
    private static bool ReadVector(ref Utf8JsonReader reader, double[] target, string path, ReplayRow row)
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

    private static void Duplicate(ref bool seen, ReplayRow row, string path)
    {
        if (seen)
        {
            row.AddError(path, "is given more than once");
        }

        seen = true;
    }

    private static string Trimmed(string prefix) => prefix.TrimEnd('.');
}
