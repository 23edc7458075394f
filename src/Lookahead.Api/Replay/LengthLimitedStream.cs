namespace Lookahead.Api.Replay;

/// <summary>A read-only view of the request body that fails once more than the allowed bytes have arrived.</summary>
internal sealed class LengthLimitedStream(Stream inner, long limit) : Stream
{
    private long read;

    public override bool CanRead => true;

    public override bool CanSeek => false;

    public override bool CanWrite => false;

    public override long Length => throw new NotSupportedException();

    public override long Position
    {
        get => read;
        set => throw new NotSupportedException();
    }

    public override int Read(byte[] buffer, int offset, int count) => Count(inner.Read(buffer, offset, count));

    public override async ValueTask<int> ReadAsync(Memory<byte> buffer, CancellationToken cancellationToken = default) =>
        Count(await inner.ReadAsync(buffer, cancellationToken));

    public override async Task<int> ReadAsync(byte[] buffer, int offset, int count, CancellationToken cancellationToken) =>
        Count(await inner.ReadAsync(buffer.AsMemory(offset, count), cancellationToken));

    public override void Flush()
    {
    }

    public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();

    public override void SetLength(long value) => throw new NotSupportedException();

    public override void Write(byte[] buffer, int offset, int count) => throw new NotSupportedException();

    private int Count(int bytes)
    {
        read += bytes;
        if (read > limit)
        {
            throw new ReplayBodyTooLargeException(limit);
        }

        return bytes;
    }
}

/// <summary>The replay body passed its size limit after results had started to stream.</summary>
internal sealed class ReplayBodyTooLargeException(long limit) : IOException($"the body is larger than the {limit} bytes accepted for replay")
{
    public long Limit { get; } = limit;
}
