using System.Text.Json;
using Lookahead.Api.Http;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Replay;

/// <summary>Writes one replay result object; the same shape for JSON and NDJSON replay.</summary>
internal static class ResultJsonWriter
{
    private static readonly JsonEncodedText Row = JsonEncodedText.Encode("row");
    private static readonly JsonEncodedText Status = JsonEncodedText.Encode("status");
    private static readonly JsonEncodedText FirstMove = JsonEncodedText.Encode("firstMove");
    private static readonly JsonEncodedText Cost = JsonEncodedText.Encode("cost");
    private static readonly JsonEncodedText Inputs = JsonEncodedText.Encode("inputs");
    private static readonly JsonEncodedText States = JsonEncodedText.Encode("states");
    private static readonly JsonEncodedText Outputs = JsonEncodedText.Encode("outputs");
    private static readonly JsonEncodedText Target = JsonEncodedText.Encode("target");
    private static readonly JsonEncodedText ActiveLimits = JsonEncodedText.Encode("activeLimits");
    private static readonly JsonEncodedText Iterations = JsonEncodedText.Encode("iterations");
    private static readonly JsonEncodedText MaxOutputViolation = JsonEncodedText.Encode("maxOutputViolation");
    private static readonly JsonEncodedText SoftLimitPenalty = JsonEncodedText.Encode("softLimitPenalty");
    private static readonly JsonEncodedText Warnings = JsonEncodedText.Encode("warnings");
    private static readonly JsonEncodedText Errors = JsonEncodedText.Encode("errors");
    private static readonly JsonEncodedText Path = JsonEncodedText.Encode("path");
    private static readonly JsonEncodedText Reason = JsonEncodedText.Encode("reason");
    private static readonly JsonEncodedText Error = JsonEncodedText.Encode("error");
    private static readonly JsonEncodedText Optimal = JsonEncodedText.Encode("optimal");
    private static readonly JsonEncodedText Estimate = JsonEncodedText.Encode("estimate");
    private static readonly JsonEncodedText State = JsonEncodedText.Encode("state");
    private static readonly JsonEncodedText Disturbance = JsonEncodedText.Encode("disturbance");

    public static void Write(Utf8JsonWriter writer, ReplayRow row, ReplayDetail detail)
    {
        writer.WriteStartObject();
        writer.WriteNumber(Row, row.Number);
        if (row.Outcome is not { } outcome)
        {
            writer.WriteString(Status, Error);
            writer.WriteStartArray(Errors);
            foreach (var error in row.Errors)
            {
                writer.WriteStartObject();
                writer.WriteString(Path, error.Path);
                writer.WriteString(Reason, error.Reason);
                writer.WriteEndObject();
            }

            writer.WriteEndArray();
            writer.WriteEndObject();
            return;
        }

        if (outcome.Status == PlanStatus.Optimal)
        {
            writer.WriteString(Status, Optimal);
        }
        else
        {
            writer.WriteString(Status, WireNames.Status(outcome.Status));
        }

        if (detail == ReplayDetail.FirstMove || row.Plan is not { } plan)
        {
            WriteVector(writer, FirstMove, row.FirstMove);
            writer.WriteNumber(Cost, outcome.Cost);
        }
        else
        {
            WriteRows(writer, Inputs, plan.Inputs, plan.InputCount);
            WriteRows(writer, States, plan.States, plan.StateCount);
            WriteRows(writer, Outputs, plan.Outputs, plan.OutputCount);
            writer.WriteNumber(Cost, plan.Cost);
            if (plan.Target is { } target)
            {
                writer.WriteStartObject(Target);
                WriteVector(writer, States, target.State);
                WriteVector(writer, Inputs, target.Input);
                WriteVector(writer, Outputs, target.Output);
                writer.WriteBoolean("referenceReached", target.ReferenceReached);
                writer.WriteBoolean("limitedByInputLimits", target.LimitedByInputLimits);
                writer.WriteEndObject();
            }

            writer.WriteStartArray(ActiveLimits);
            foreach (var limit in plan.ActiveLimits)
            {
                writer.WriteStartObject();
                writer.WriteString("kind", WireNames.Limit(limit.Kind));
                writer.WriteNumber("step", limit.Step);
                writer.WriteNumber("index", limit.Index);
                writer.WriteEndObject();
            }

            writer.WriteEndArray();
            writer.WriteNumber(Iterations, plan.Iterations);
            writer.WriteNumber(MaxOutputViolation, plan.MaxOutputViolation);
            writer.WriteNumber(SoftLimitPenalty, plan.SoftLimitPenalty);
        }

        // An estimation replay's row says what it was planned from, shaped as /estimate answers it.
        if (row.Estimate is { } estimate)
        {
            writer.WriteStartObject(Estimate);
            WriteVector(writer, State, estimate.State);
            WriteVector(writer, Disturbance, estimate.Disturbance);
            writer.WriteEndObject();
        }

        var warnings = outcome.Warnings;
        if (warnings.Count > 0 || row.EstimationWarnings.Count > 0 || detail == ReplayDetail.Full)
        {
            writer.WritePropertyName(Warnings);
            WriteWarnings(writer, row.EstimationWarnings.Count == 0 ? WarningText.ToDtos(warnings) : WarningText.ToDtos([.. row.EstimationWarnings, .. warnings]));
        }

        writer.WriteEndObject();
    }

    /// <summary>A warnings array, shaped exactly as in the other responses.</summary>
    public static void WriteWarnings(Utf8JsonWriter writer, IEnumerable<WarningDto> warnings)
    {
        writer.WriteStartArray();
        foreach (var warning in warnings)
        {
            JsonSerializer.Serialize(writer, warning, HttpJsonContext.Default.WarningDto);
        }

        writer.WriteEndArray();
    }

    private static void WriteVector(Utf8JsonWriter writer, JsonEncodedText name, ReadOnlySpan<double> values)
    {
        writer.WriteStartArray(name);
        foreach (double v in values)
        {
            writer.WriteNumberValue(v);
        }

        writer.WriteEndArray();
    }

    private static void WriteRows(Utf8JsonWriter writer, JsonEncodedText name, double[] flat, int columns)
    {
        writer.WriteStartArray(name);
        for (int start = 0; start + columns <= flat.Length && columns > 0; start += columns)
        {
            writer.WriteStartArray();
            foreach (double v in flat.AsSpan(start, columns))
            {
                writer.WriteNumberValue(v);
            }

            writer.WriteEndArray();
        }

        writer.WriteEndArray();
    }

    /// <summary>The totals a JSON or NDJSON replay ends with: rows, failedRows, complete, and why not when it was cut.</summary>
    public static void WriteTotals(Utf8JsonWriter json, ReplaySummary summary)
    {
        json.WriteNumber("rows", summary.Rows);
        json.WriteNumber("failedRows", summary.FailedRows);
        json.WriteBoolean("complete", summary.Complete);
        if (summary.CutReason is { } reason)
        {
            json.WriteString("reason", reason);
        }
    }
}
