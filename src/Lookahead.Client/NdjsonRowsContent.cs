using System.Net;
using System.Net.Http.Headers;

namespace Lookahead.Client;

/// <summary>
/// An NDJSON upload written from rows as they are produced: one JSON line each, sent in chunks of about 64 KiB, so a
/// replay of any length never sits in memory.
/// </summary>
internal sealed class NdjsonRowsContent : HttpContent
{
    private const int ChunkBytes = 64 * 1024;
    private readonly IAsyncEnumerable<ReplayRowRequest> rows;

    public NdjsonRowsContent(IAsyncEnumerable<ReplayRowRequest> rows)
    {
        this.rows = rows;
        Headers.ContentType = new MediaTypeHeaderValue("application/x-ndjson");
    }

    protected override Task SerializeToStreamAsync(Stream stream, TransportContext? context) =>
        SerializeToStreamAsync(stream, context, CancellationToken.None);

    protected override async Task SerializeToStreamAsync(Stream stream, TransportContext? context, CancellationToken cancellationToken)
    {
        using var chunk = new MemoryStream(ChunkBytes + 4096);
        await foreach (var row in rows.WithCancellation(cancellationToken))
        {
            byte[] line = ClientJson.ToUtf8(row, typeof(ReplayRowRequest));
            chunk.Write(line);
            chunk.WriteByte((byte)'\n');
            if (chunk.Length >= ChunkBytes)
            {
                await stream.WriteAsync(chunk.GetBuffer().AsMemory(0, (int)chunk.Length), cancellationToken);
                await stream.FlushAsync(cancellationToken);
                chunk.SetLength(0);
            }
        }

        if (chunk.Length > 0)
        {
            await stream.WriteAsync(chunk.GetBuffer().AsMemory(0, (int)chunk.Length), cancellationToken);
        }
    }

    protected override bool TryComputeLength(out long length)
    {
        length = 0;
        return false;
    }
}
