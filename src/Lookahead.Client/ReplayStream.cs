namespace Lookahead.Client;

/// <summary>
/// The results of one replay, read as they arrive: enumerate once. The upload is sent while the answers are read, so
/// neither is held in memory whole. After the last result, <see cref="Summary"/> holds the service's closing summary;
/// an answer broken off before it throws <see cref="ReplayCutException"/>.
/// </summary>
public sealed class ReplayStream<T> : IAsyncEnumerable<T>
{
    private readonly Func<ReplayStream<T>, CancellationToken, IAsyncEnumerable<T>> produce;
    private readonly CancellationToken createdWith;
    private int started;

    internal ReplayStream(Func<ReplayStream<T>, CancellationToken, IAsyncEnumerable<T>> produce, CancellationToken createdWith)
    {
        this.produce = produce;
        this.createdWith = createdWith;
    }

    /// <summary>The summary the answer ended with; null until the results have been read to the end.</summary>
    public ReplaySummary? Summary { get; internal set; }

    public IAsyncEnumerator<T> GetAsyncEnumerator(CancellationToken cancellationToken = default)
    {
        if (Interlocked.Exchange(ref started, 1) != 0)
        {
            throw new InvalidOperationException("A replay's results can be read once: its upload has been sent.");
        }

        return Linked(cancellationToken).GetAsyncEnumerator(cancellationToken);
    }

    private async IAsyncEnumerable<T> Linked([System.Runtime.CompilerServices.EnumeratorCancellation] CancellationToken cancellationToken)
    {
        using var both = CancellationTokenSource.CreateLinkedTokenSource(createdWith, cancellationToken);
        await foreach (var item in produce(this, both.Token).WithCancellation(both.Token))
        {
            yield return item;
        }
    }
}

/// <summary>A replay answer ended without its summary: the connection failed or the service went away mid-stream.</summary>
public sealed class ReplayCutException : IOException
{
    public ReplayCutException()
        : this("the replay answer ended without its summary: it was broken off")
    {
    }

    public ReplayCutException(string message)
        : base(message)
    {
    }

    public ReplayCutException(string message, Exception innerException)
        : base(message, innerException)
    {
    }

    /// <summary>Results read before the answer broke off.</summary>
    public long ResultsRead { get; init; }
}
