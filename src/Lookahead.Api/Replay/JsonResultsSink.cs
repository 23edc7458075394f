using System.Buffers;
using System.IO.Pipelines;
using System.Text.Json;
using Lookahead.Api.Http;

namespace Lookahead.Api.Replay;

/// <summary>
/// Writes { "modelId", "detail", "results": [ … ], "rows", "failedRows", "complete", "reason"?, "warnings" } as it
/// goes; the totals come last because they are only known at the end.
/// </summary>
internal sealed class JsonResultsSink(PipeWriter writer, string modelId, Func<ReplayDetail> detail, Func<IReadOnlyList<WarningDto>> sourceWarnings) : IReplaySink
{
    public bool NeedsFullPlan => detail() == ReplayDetail.Full;

    private bool first = true;

    public ValueTask StartAsync(CancellationToken cancellationToken)
    {
        using var json = new Utf8JsonWriter(writer, new JsonWriterOptions { Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping });
        json.WriteStartObject();
        json.WriteString("modelId", modelId);
        json.WriteString("detail", ReplayDetails.Name(detail()));
        json.WriteStartArray("results");
        json.Flush();

        // Disposing the writer closes nothing: the array and the object are closed in CompleteAsync.
        return ValueTask.CompletedTask;
    }

    public void Format(ReplayRow row, Utf8JsonWriter scratch)
    {
        scratch.Reset(row.Output);
        ResultJsonWriter.Write(scratch, row, detail());
        scratch.Flush();
    }

    public async ValueTask WriteAsync(ReplayBatch batch, CancellationToken cancellationToken)
    {
        for (int i = 0; i < batch.Count; i++)
        {
            if (!first)
            {
                writer.Write(","u8);
            }

            first = false;
            writer.Write(batch[i].Output.WrittenSpan);
        }

        await writer.FlushAsync(cancellationToken);
    }

    public async ValueTask CompleteAsync(ReplaySummary summary, CancellationToken cancellationToken)
    {
        writer.Write("]"u8);

        // Utf8JsonWriter cannot resume inside an object it did not open, so the tail is written as its own object.
        var tail = new System.Buffers.ArrayBufferWriter<byte>();
        using (var json = new Utf8JsonWriter(tail, new JsonWriterOptions { Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping }))
        {
            json.WriteStartObject();
            ResultJsonWriter.WriteTotals(json, summary);
            json.WritePropertyName("warnings");
            ResultJsonWriter.WriteWarnings(json, sourceWarnings().Concat(summary.Warnings));
            json.WriteEndObject();
        }

        // Replace the tail object's opening brace with a comma: {"rows":…} becomes ,"rows":…}
        writer.Write(","u8);
        writer.Write(tail.WrittenSpan[1..]);
        await writer.FlushAsync(cancellationToken);
    }
}
