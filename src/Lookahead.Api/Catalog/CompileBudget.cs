using System.Globalization;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;
using Microsoft.Extensions.Options;

namespace Lookahead.Api.Catalog;

/// <summary>
/// Runs compiles within this instance's budgets. Before a compile starts, the core's size estimate is checked against
/// the per-model limit (too large: 400 naming the horizon) and, together with the compiles in flight, against the memory
/// budget (503); then it takes one of the concurrent slots or waits in a bounded queue (full: 503). A compile is
/// cancelled when its caller's token fires (the client left, while queued or running) or its time budget is spent
/// (503). Refusals happen up front, so a refused request costs no compile work.
/// </summary>
public sealed class CompileBudget : IDisposable
{
    /// <summary>Estimated bytes compiled since the last full collection worth giving back once compiles drain.</summary>
    private const long CollectAfterBytes = 256L * 1024 * 1024;

    private readonly CompileBudgetOptions options;
    private readonly IModelCompilation compilation;
    private readonly CatalogMetrics metrics;
    private readonly SemaphoreSlim slots;
    private readonly TimeProvider time;
    private readonly Lock gate = new();
    private long bytesInFlight;
    private long compiledSinceCollection;
    private int waiting;

    public CompileBudget(IOptions<CompileBudgetOptions> options, IModelCompilation compilation, CatalogMetrics metrics, TimeProvider time)
    {
        this.options = options.Value;
        this.compilation = compilation;
        this.metrics = metrics;
        this.time = time;
        int concurrency = this.options.EffectiveConcurrency;
        slots = new SemaphoreSlim(concurrency, concurrency);
    }

    /// <summary>
    /// Compiles <paramref name="document"/> on a worker thread within the budgets.
    /// </summary>
    /// <exception cref="ModelValidationException">The document is invalid, or its compiled form would exceed <see cref="CompileBudgetOptions.MaxModelBytes"/>.</exception>
    /// <exception cref="CompileRefusedException">The memory budget or the queue is full, or the time budget ran out.</exception>
    /// <exception cref="OperationCanceledException"><paramref name="cancellationToken"/> fired; nothing is compiled after that.</exception>
    public async Task<CompiledModel> RunAsync(ModelDocument document, CompileOptions compileOptions, CancellationToken cancellationToken)
    {
        long estimate = CompiledSizeEstimate.Bytes(document);
        if (estimate > options.MaxModelBytes)
        {
            metrics.CompilesRefused.WithLabels(CompileRefusalLabels.Of(CompileRefusal.TooLarge)).Inc();
            throw new ModelValidationException(
                "cost.horizon",
                $"with {Dimensions(document)} the compiled model would keep about {Megabytes(estimate)}, more than the {Megabytes(options.MaxModelBytes)} one model may use here — shorten the horizon or reduce the inputs, outputs or limited outputs");
        }

        bool hasSlot = Admit(estimate);
        try
        {
            if (!hasSlot)
            {
                await WaitForSlotAsync(cancellationToken);
            }

            try
            {
                return await CompileWithinTimeAsync(document, compileOptions, cancellationToken);
            }
            finally
            {
                slots.Release();
            }
        }
        finally
        {
            bool drained;
            lock (gate)
            {
                bytesInFlight -= estimate;
                compiledSinceCollection += estimate;
                drained = bytesInFlight == 0 && compiledSinceCollection >= CollectAfterBytes;
                if (drained)
                {
                    compiledSinceCollection = 0;
                }
            }

            if (drained)
            {
                GiveBackMemory();
            }
        }
    }

    /// <summary>
    /// After a burst of large compiles their working arrays (and any models the cache evicted meanwhile) are garbage
    /// in the large-object heap, which only a full collection frees; plans allocate too little to cause one, so the
    /// process would keep that memory indefinitely. Once the last compile in flight ends, one compacting collection
    /// gives it back to the system: a single pause after the burst, not one per compile.
    /// </summary>
    private static void GiveBackMemory() =>
        ThreadPool.UnsafeQueueUserWorkItem(_ => GC.Collect(GC.MaxGeneration, GCCollectionMode.Aggressive, blocking: true, compacting: true), null);

    public void Dispose() => slots.Dispose();

    /// <summary>
    /// Claims the estimate in the memory budget and a free slot (true) or, when every slot is busy, a place in the
    /// queue (false) — or refuses. Under one lock, so the queue never holds more than its limit.
    /// </summary>
    private bool Admit(long estimate)
    {
        lock (gate)
        {
            if (bytesInFlight + estimate > options.MemoryBudgetBytes)
            {
                metrics.CompilesRefused.WithLabels(CompileRefusalLabels.Of(CompileRefusal.MemoryBusy)).Inc();
                throw new CompileRefusedException(CompileRefusal.MemoryBusy, $"The compiles in progress claim this instance's compile memory budget ({Megabytes(options.MemoryBudgetBytes)}); this model needs about {Megabytes(estimate)}. Retry after the interval in Retry-After.");
            }

            if (slots.Wait(0))
            {
                bytesInFlight += estimate;
                return true;
            }

            if (waiting >= options.QueueLimit)
            {
                metrics.CompilesRefused.WithLabels(CompileRefusalLabels.Of(CompileRefusal.QueueFull)).Inc();
                throw new CompileRefusedException(CompileRefusal.QueueFull, $"{options.EffectiveConcurrency} model compile(s) are running and {waiting} waiting, the most this instance takes. Retry after the interval in Retry-After.");
            }

            bytesInFlight += estimate;
            waiting++;
            metrics.CompilesQueued.Inc();
            return false;
        }
    }

    private async Task WaitForSlotAsync(CancellationToken cancellationToken)
    {
        try
        {
            await slots.WaitAsync(cancellationToken);
        }
        catch (OperationCanceledException)
        {
            metrics.CompilesAbandoned.WithLabels("queued").Inc();
            throw;
        }
        finally
        {
            lock (gate)
            {
                waiting--;
            }

            metrics.CompilesQueued.Dec();
        }
    }

    private async Task<CompiledModel> CompileWithinTimeAsync(ModelDocument document, CompileOptions compileOptions, CancellationToken cancellationToken)
    {
        using var budget = new CancellationTokenSource(TimeSpan.FromSeconds(options.TimeoutSeconds), time);
        using var linked = CancellationTokenSource.CreateLinkedTokenSource(cancellationToken, budget.Token);
        metrics.CompilesRunning.Inc();
        try
        {
            // A thread of its own at lower priority: the compile is CPU-bound and must not hold a pool thread or the
            // request's, nor take the cores from plans.
            return await CompileThread.Run(() => compilation.Compile(document, compileOptions, linked.Token));
        }
        catch (OperationCanceledException ex) when (budget.IsCancellationRequested && !cancellationToken.IsCancellationRequested)
        {
            metrics.CompilesRefused.WithLabels(CompileRefusalLabels.Of(CompileRefusal.Timeout)).Inc();
            throw new CompileRefusedException(CompileRefusal.Timeout, $"Compiling this model took longer than the {options.TimeoutSeconds} s this instance allows and was stopped. Retry after the interval in Retry-After, or shorten the horizon.", ex);
        }
        catch (OperationCanceledException)
        {
            metrics.CompilesAbandoned.WithLabels("running").Inc();
            throw;
        }
        finally
        {
            metrics.CompilesRunning.Dec();
        }
    }

    private static string Dimensions(ModelDocument document)
    {
        int n = document.Plant.A?.Length ?? 0;
        int m = document.Plant.B is { Length: > 0 } b ? b[0]?.Length ?? 0 : 0;
        int p = document.Plant.C?.Length ?? n;
        return string.Create(CultureInfo.InvariantCulture, $"{n} states, {m} inputs, {p} outputs and horizon {document.Cost.Horizon}");
    }

    private static string Megabytes(long bytes) => string.Create(CultureInfo.InvariantCulture, $"{bytes / (1024.0 * 1024.0):0.##} MB");
}
