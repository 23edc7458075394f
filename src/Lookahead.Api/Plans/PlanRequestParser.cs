using System.Text.Json;
using Lookahead.Api.Http;

namespace Lookahead.Api.Plans;

/// <summary>
/// The one parser of a plan request ({ "state", "reference"?, "previousInput"?, "disturbance"? }, where a reference
/// is one setpoint or a schedule of rows and a disturbance one vector or a forecast of rows), for /plan, alias plans and
/// JSON and NDJSON replay rows. It reads straight into the call's preallocated vectors with Utf8JsonReader: no DTO,
/// no intermediate arrays, and a wrong length is found without growing anything.
/// </summary>
public static class PlanRequestParser
{
    /// <summary>The members of a plan request, for "did you mean" hints.</summary>
    internal static readonly string[] Fields = ["state", "reference", "previousInput", "disturbance", "estimate"];

    /// <summary>The members of an estimate.</summary>
    internal static readonly string[] EstimateFields = ["state", "disturbance"];

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

            bool sawState = false, sawReference = false, sawPrevious = false, sawDisturbance = false, sawEstimate = false;
            bool misspeltStart = false;
            while (reader.Read() && reader.TokenType == JsonTokenType.PropertyName)
            {
                JsonText.CheckName(ref reader);
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
                    var (isVector, rows) = ReadVectorOrRows(ref reader, row.Reference, () => row.ReferenceRows, pathPrefix + "reference", row);
                    row.HasReference = isVector;
                    row.ReferenceRowCount = rows;
                }
                else if (reader.ValueTextEquals("estimate"u8))
                {
                    Duplicate(ref sawEstimate, row, pathPrefix + "estimate");
                    reader.Read();
                    ReadEstimate(ref reader, row, pathPrefix + "estimate");
                }
                else if (reader.ValueTextEquals("disturbance"u8))
                {
                    Duplicate(ref sawDisturbance, row, pathPrefix + "disturbance");
                    reader.Read();
                    if (row.DisturbanceCount == 0)
                    {
                        if (reader.TokenType != JsonTokenType.Null)
                        {
                            row.AddError(pathPrefix + "disturbance", "the model has no measured disturbances (plant.e)");
                        }

                        reader.Skip();
                    }
                    else
                    {
                        // One vector is a forecast of one row, held over the horizon.
                        var (isVector, rows) = ReadVectorOrRows(ref reader, row.DisturbanceRows[0], () => row.DisturbanceRows, pathPrefix + "disturbance", row);
                        row.DisturbanceRowCount = isVector ? 1 : rows;
                    }
                }
                else if (reader.ValueTextEquals("previousInput"u8))
                {
                    Duplicate(ref sawPrevious, row, pathPrefix + "previousInput");
                    reader.Read();
                    row.HasPreviousInput = ReadVector(ref reader, row.PreviousInput, pathPrefix + "previousInput", row);
                }
                else
                {
                    string name = JsonText.GetString(ref reader);
                    string? hint = DidYouMean.Closest(name, Fields);

                    // A misspelt state or estimate is the one mistake: saying the state is missing too would send the client looking for a second.
                    misspeltStart |= hint is "state" or "estimate";
                    row.AddError(pathPrefix + name, DidYouMean.UnknownFieldReason(name, Fields));
                    reader.Read();
                    reader.Skip();
                }
            }

            if (reader.Read())
            {
                row.AddError(Trimmed(pathPrefix), "has content after the end of the object");
            }

            if (sawState && sawEstimate)
            {
                row.AddError(pathPrefix + "estimate", "give a measured state or an estimate, not both");
            }
            else if (!sawState && !sawEstimate && !misspeltStart)
            {
                row.AddError(pathPrefix + "state", "is required (or an estimate from the model's estimator)");
            }
        }
        catch (JsonException ex)
        {
            var description = JsonErrorDescriber.Describe(ex, maxDepth);
            row.AddError(Trimmed(pathPrefix), description.Error.Reason);
            if (description.IsSyntax)
            {
                row.SyntaxErrorAt = (description.Line ?? 1, description.Position ?? 1);
            }
        }
    }

    /// <summary>Reads an array into <paramref name="target"/>; false for null (absent). Length and entries are checked.</summary>
    /// <remarks>Shared with replay's estimation rows, which read the same vectors under other field names.</remarks>
    internal static bool ReadVector(ref Utf8JsonReader reader, double[] target, string path, PlanCall row)
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

        reader.Read();
        ReadElements(ref reader, target, path, row);
        return true;
    }

    /// <summary>
    /// Reads one vector (into <paramref name="vector"/>) or an array of rows (into the rows <paramref name="rows"/> gives,
    /// at most as many as it has: the horizon). Returns whether a vector was read and how many rows; (false, 0) for null.
    /// </summary>
    internal static (bool IsVector, int Rows) ReadVectorOrRows(ref Utf8JsonReader reader, double[] vector, Func<double[][]> rows, string path, PlanCall row)
    {
        if (reader.TokenType == JsonTokenType.Null)
        {
            return (false, 0);
        }

        if (reader.TokenType != JsonTokenType.StartArray)
        {
            row.AddError(path, "must be an array of numbers, or an array of rows");
            reader.Skip();
            return (true, 0);
        }

        reader.Read();
        if (reader.TokenType != JsonTokenType.StartArray)
        {
            ReadElements(ref reader, vector, path, row);
            return (true, 0);
        }

        var target = rows();
        int count = 0;
        while (reader.TokenType != JsonTokenType.EndArray)
        {
            if (count < target.Length)
            {
                ReadVector(ref reader, target[count], $"{path}[{count}]", row);
            }
            else
            {
                // More rows than the horizon: counted, not kept.
                reader.Skip();
            }

            count++;
            reader.Read();
        }

        if (count > target.Length)
        {
            row.AddError(path, $"has {count} rows; give 1 to {target.Length} (the horizon), the last one is held to the end");
            return (false, 0);
        }

        return (false, count);
    }

    /// <summary>Reads numbers from the current token to the end of the array into <paramref name="target"/>, checking each and the count.</summary>
    private static void ReadElements(ref Utf8JsonReader reader, double[] target, string path, PlanCall row)
    {
        int count = 0;
        while (reader.TokenType != JsonTokenType.EndArray)
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
            reader.Read();
        }

        if (count != target.Length)
        {
            row.AddError(path, $"has {count} entries; expected {target.Length}");
        }
    }

    /// <summary>{ "state": x̂, "disturbance": d̂ } of the model's estimator, into the call's state and disturbance estimate.</summary>
    private static void ReadEstimate(ref Utf8JsonReader reader, PlanCall row, string path)
    {
        if (!row.AcceptsEstimate)
        {
            row.AddError(path, "the model has no estimator; send a measured state");
            reader.Skip();
            return;
        }

        if (reader.TokenType != JsonTokenType.StartObject)
        {
            row.AddError(path, "must be an object with 'state' and 'disturbance' arrays");
            reader.Skip();
            return;
        }

        bool state = false, disturbance = false, sawState = false, sawDisturbance = false;
        while (reader.Read() && reader.TokenType == JsonTokenType.PropertyName)
        {
            JsonText.CheckName(ref reader);
            if (reader.ValueTextEquals("state"u8))
            {
                Duplicate(ref sawState, row, path + ".state");
                reader.Read();
                state = ReadVector(ref reader, row.State, path + ".state", row);
            }
            else if (reader.ValueTextEquals("disturbance"u8))
            {
                Duplicate(ref sawDisturbance, row, path + ".disturbance");
                reader.Read();
                disturbance = ReadVector(ref reader, row.DisturbanceEstimate, path + ".disturbance", row);
            }
            else
            {
                string name = JsonText.GetString(ref reader);
                row.AddError($"{path}.{name}", DidYouMean.UnknownFieldReason(name, EstimateFields));
                reader.Read();
                reader.Skip();
            }
        }

        if (!state)
        {
            row.AddError(path + ".state", "is required");
        }

        if (!disturbance)
        {
            row.AddError(path + ".disturbance", "is required (the estimator's disturbance estimate)");
        }

        row.HasDisturbanceEstimate = disturbance;
    }

    internal static void Duplicate(ref bool seen, PlanCall row, string path)
    {
        if (seen)
        {
            row.AddError(path, "is given more than once");
        }

        seen = true;
    }

    private static string Trimmed(string prefix) => prefix.TrimEnd('.');
}
