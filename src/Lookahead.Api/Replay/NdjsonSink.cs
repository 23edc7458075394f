using System.Buffers;
using System.IO.Pipelines;
using System.Text.Json;

namespace Lookahead.Api.Replay;

/// <summary>
/// One result per line, in input order, flushed after every batch; the last line is the summary
/// <c>{"summary":{"rows","failedRows","complete","reason"?}}</c>, which no result line can be mistaken for.
/// </summary>
internal sealed class NdjsonSink(PipeWriter writer, ReplayDetail detail) : IReplaySink
{
    public ValueTask StartAsync(CancellationToken cancellationToken) => ValueTask.CompletedTask;

    public bool NeedsFullPlan => detail == ReplayDetail.Full;

    public void Format(ReplayRow row, Utf8JsonWriter scratch)
    {
        scratch.Reset(row.Output);
        ResultJsonWriter.Write(scratch, row, detail);
        scratch.Flush();
        row.Output.Write("\n"u8);
    }

    public async ValueTask WriteAsync(ReplayBatch batch, CancellationToken cancellationToken)
    {
        for (int i = 0; i < batch.Count; i++)
        {
            writer.Write(batch[i].Output.WrittenSpan);
        }

        await writer.FlushAsync(cancellationToken);
    }

    public async ValueTask CompleteAsync(ReplaySummary summary, CancellationToken cancellationToken)
    {
        using (var json = new Utf8JsonWriter(writer))
        {
            json.WriteStartObject();
            json.WriteStartObject("summary");
            ResultJsonWriter.WriteTotals(json, summary);
            json.WriteEndObject();
            json.WriteEndObject();
        }

        writer.Write("\n"u8);
        await writer.FlushAsync(cancellationToken);
    }
}
