using System.Collections.Concurrent;
using System.Threading.Channels;
using Lookahead.Api.Catalog;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Tests.Support;

/// <summary>
/// The core's compile behind a gate the test opens: each compile reports that it started, then waits for
/// <see cref="Open"/> (or its token) before compiling. Lets a test hold a compile slot for as long as it needs.
/// </summary>
public sealed class HeldCompilation : IModelCompilation
{
    private readonly TaskCompletionSource opened = new(TaskCreationOptions.RunContinuationsAsynchronously);
    private readonly ConcurrentQueue<string?> started = new();
    private readonly ConcurrentQueue<string?> cancelled = new();
    private readonly Channel<string?> startedSignal = Channel.CreateUnbounded<string?>();

    /// <summary>Names of the documents whose compile began, in order.</summary>
    public IReadOnlyCollection<string?> Started => started;

    /// <summary>Names of the documents whose compile saw its token cancelled while held.</summary>
    public IReadOnlyCollection<string?> Cancelled => cancelled;

    public void Open() => opened.TrySetResult();

    /// <summary>Waits (bounded, so a broken budget fails the test instead of hanging it) until one more compile has begun.</summary>
    public async Task WaitForStartAsync()
    {
        using var bound = new CancellationTokenSource(TimeSpan.FromSeconds(30));
        await startedSignal.Reader.ReadAsync(bound.Token);
    }

    public CompiledModel Compile(ModelDocument document, CompileOptions options, CancellationToken cancellationToken)
    {
        started.Enqueue(document.Name);
        startedSignal.Writer.TryWrite(document.Name);
        try
        {
            opened.Task.Wait(cancellationToken);
        }
        catch (OperationCanceledException)
        {
            cancelled.Enqueue(document.Name);
            throw;
        }

        return ModelCompiler.Compile(document, options, cancellationToken);
    }
}
