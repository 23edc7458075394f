using System.Text.Json;
using Lookahead.Api.Http;
using Lookahead.Api.Plans;

namespace Lookahead.Api.Replay;

/// <summary>
/// Reads one JSON or NDJSON row of an estimation replay, { "measurement": [p] | null, "appliedInput": [m],
/// "reference"?: one setpoint or a schedule, "disturbance"?: [q] }, straight into the row's buffers (the same vector
/// readers as <see cref="PlanRequestParser"/>, so lengths and entries are checked the same way).
/// </summary>
internal static class EstimationRowParser
{
    /// <summary>The members of an estimation row, for "did you mean" hints.</summary>
    private static readonly string[] Fields = ["measurement", "appliedInput", "reference", "disturbance"];

    /// <param name="json">The row's bytes.</param>
    /// <param name="row">Receives the vectors, or the errors with their paths.</param>
    /// <param name="pathPrefix">Prepended to every error path ("" for NDJSON, "requests[3]." inside a JSON body).</param>
    /// <param name="maxDepth">Deepest nesting accepted.</param>
    public static void Parse(ReadOnlySpan<byte> json, ReplayRow row, string pathPrefix, int maxDepth)
    {
        var reader = new Utf8JsonReader(json, new JsonReaderOptions { MaxDepth = maxDepth });
        try
        {
            if (!reader.Read() || reader.TokenType != JsonTokenType.StartObject)
            {
                row.AddError(pathPrefix.TrimEnd('.'), "must be an object with 'measurement' and 'appliedInput'");
                return;
            }

            bool sawMeasurement = false, sawApplied = false, sawReference = false, sawDisturbance = false, applied = false;
            bool misspeltMeasurement = false, misspeltApplied = false;
            while (reader.Read() && reader.TokenType == JsonTokenType.PropertyName)
            {
                JsonText.CheckName(ref reader);
                if (reader.ValueTextEquals("measurement"u8))
                {
                    PlanRequestParser.Duplicate(ref sawMeasurement, row, pathPrefix + "measurement");
                    reader.Read();
                    row.HasMeasurement = PlanRequestParser.ReadVector(ref reader, row.Measurement, pathPrefix + "measurement", row);
                }
                else if (reader.ValueTextEquals("appliedInput"u8))
                {
                    PlanRequestParser.Duplicate(ref sawApplied, row, pathPrefix + "appliedInput");
                    reader.Read();
                    applied = PlanRequestParser.ReadVector(ref reader, row.AppliedInput, pathPrefix + "appliedInput", row);
                }
                else if (reader.ValueTextEquals("reference"u8))
                {
                    PlanRequestParser.Duplicate(ref sawReference, row, pathPrefix + "reference");
                    reader.Read();
                    var (isVector, rows) = PlanRequestParser.ReadVectorOrRows(ref reader, row.Reference, () => row.ReferenceRows, pathPrefix + "reference", row);
                    row.HasReference = isVector;
                    row.ReferenceRowCount = rows;
                }
                else if (reader.ValueTextEquals("disturbance"u8))
                {
                    PlanRequestParser.Duplicate(ref sawDisturbance, row, pathPrefix + "disturbance");
                    reader.Read();
                    ReadDisturbance(ref reader, row, pathPrefix + "disturbance");
                }
                else if (reader.ValueTextEquals("state"u8) || reader.ValueTextEquals("estimate"u8))
                {
                    row.AddError(pathPrefix + JsonText.GetString(ref reader), "this replay estimates from measurements (its first row has one): give 'measurement' and 'appliedInput', not a state");
                    reader.Read();
                    reader.Skip();
                }
                else if (reader.ValueTextEquals("previousInput"u8))
                {
                    row.AddError(pathPrefix + "previousInput", "in an estimation replay the applied input is the previous input; leave it out");
                    reader.Read();
                    reader.Skip();
                }
                else
                {
                    string name = JsonText.GetString(ref reader);
                    string? hint = DidYouMean.Closest(name, Fields);

                    // The misspelt member is the mistake; "measurement is required" beside it would be a second, misleading one.
                    misspeltMeasurement |= hint == "measurement";
                    misspeltApplied |= hint == "appliedInput";
                    row.AddError(pathPrefix + name, DidYouMean.UnknownFieldReason(name, Fields));
                    reader.Read();
                    reader.Skip();
                }
            }

            if (reader.Read())
            {
                row.AddError(pathPrefix.TrimEnd('.'), "has content after the end of the object");
            }

            if (!sawMeasurement && !misspeltMeasurement)
            {
                row.AddError(pathPrefix + "measurement", "is required (null when the reading is missing)");
            }

            if (!applied && !misspeltApplied)
            {
                row.AddError(pathPrefix + "appliedInput", "is required (the input held since the previous row)");
            }
        }
        catch (JsonException ex)
        {
            var description = JsonErrorDescriber.Describe(ex, maxDepth);
            row.AddError(pathPrefix.TrimEnd('.'), description.Error.Reason);
            if (description.IsSyntax)
            {
                row.SyntaxErrorAt = (description.Line ?? 1, description.Position ?? 1);
            }
        }
    }

    /// <summary>
    /// One vector: v over the interval that ends at this row (the estimator's), also held over the horizon (the plan's).
    /// A forecast of rows would give the two different meanings, so it is refused here.
    /// </summary>
    private static void ReadDisturbance(ref Utf8JsonReader reader, ReplayRow row, string path)
    {
        if (row.DisturbanceCount == 0)
        {
            if (reader.TokenType != JsonTokenType.Null)
            {
                row.AddError(path, "the model has no measured disturbances (plant.e)");
            }

            reader.Skip();
            return;
        }

        var (isVector, rows) = PlanRequestParser.ReadVectorOrRows(ref reader, row.DisturbanceRows[0], () => row.DisturbanceRows, path, row);
        if (rows > 0)
        {
            row.AddError(path, "must be one vector in an estimation replay: the value over the interval that ends at this row, held over the horizon");
            return;
        }

        row.DisturbanceRowCount = isVector ? 1 : 0;
    }
}
