using System.Text.Json;
using Lookahead.Api.Http;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Replay;

/// <summary>
/// Chooses the mode of a JSON or NDJSON replay from the top-level field names of its first row that names either a
/// state ("state", "estimate") or a measurement ("measurement", "appliedInput"). It runs before any result is
/// written, so a first row that mixes both, or measurements for a model without an estimator, is answered with 400.
/// </summary>
internal static class ReplayModeProbe
{
    public static (ReplayMode Mode, List<ProblemError> Errors) Choose(ReplayBatch first, CompiledModel model, Func<ReplayRow, string> pathPrefix, int maxDepth)
    {
        for (int i = 0; i < first.Count; i++)
        {
            var row = first[i];
            if (row.Errors.Count > 0)
            {
                continue;
            }

            var (state, measurement) = FieldsOf(row.RawSpan, maxDepth);
            string prefix = pathPrefix(row);
            if (state is not null && measurement is not null)
            {
                return (ReplayMode.States, [new ProblemError(prefix + measurement, $"give '{state}' or a measurement with its applied input, not both (row {row.Number} decides what every row of the replay carries)")]);
            }

            if (measurement is not null)
            {
                return model.Estimator is null
                    ? (ReplayMode.States, [new ProblemError(prefix + measurement, "the model has no estimator, so a replay cannot estimate from measurements: register it with one, or send states")])
                    : (ReplayMode.Measurements, []);
            }

            if (state is not null)
            {
                return (ReplayMode.States, []);
            }
        }

        // Nothing named either: plain rows, whose own errors will say what is missing.
        return (ReplayMode.States, []);
    }

    /// <summary>The first state field and the first measurement field among the object's top-level names (null when absent); broken JSON ends the look.</summary>
    private static (string? State, string? Measurement) FieldsOf(ReadOnlySpan<byte> json, int maxDepth)
    {
        string? state = null, measurement = null;
        var reader = new Utf8JsonReader(json, new JsonReaderOptions { MaxDepth = maxDepth });
        try
        {
            if (!reader.Read() || reader.TokenType != JsonTokenType.StartObject)
            {
                return (null, null);
            }

            while (reader.Read() && reader.TokenType == JsonTokenType.PropertyName)
            {
                JsonText.CheckName(ref reader);
                if (reader.ValueTextEquals("state"u8) || reader.ValueTextEquals("estimate"u8))
                {
                    state ??= reader.GetString();
                }
                else if (reader.ValueTextEquals("measurement"u8) || reader.ValueTextEquals("appliedInput"u8))
                {
                    measurement ??= reader.GetString();
                }

                reader.Read();
                reader.Skip();
            }
        }
        catch (JsonException)
        {
            // What was seen before the break still counts; the row's own parse reports the break.
        }

        return (state, measurement);
    }
}
