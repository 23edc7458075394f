using System.Text.Json;
using Lookahead.Api.Http;
using Lookahead.Api.Plans;
using Lookahead.Core.Planning;
using Microsoft.Extensions.Options;

namespace Lookahead.Api.Replay;

/// <summary>
/// The replay pipeline: while one batch is planned in parallel (the compiled model is thread-safe) the next is
/// read, and results are written strictly in input order. Two batches of slots are all the memory it needs,
/// whatever the number of rows. Every batch is planned on every worker; an estimation replay
/// (<see cref="ReplayMode.Measurements"/>) first runs its estimator through the batch on one thread, because each
/// row's estimate depends on the row before. When the host begins to stop, a replay takes no further batch: it writes
/// the rows already planned and ends with a summary that says it was cut, well inside the shutdown grace.
/// </summary>
public sealed class ReplayRunner(IOptions<ReplayOptions> options, PlanRunner planner, ReplayMetrics metrics, IHostApplicationLifetime lifetime)
{
    /// <returns>The totals, or the errors that refused the whole replay before any result was written (400).</returns>
    internal async Task<ReplayRun> RunAsync(IReplaySource source, IReplaySink sink, CompiledModel model, string format, CancellationToken cancellationToken)
    {
        int size = options.Value.BatchSize;
        int n = model.StateCount, m = model.InputCount, p = model.OutputCount;
        var current = new ReplayBatch(size, n, m, p, model.DisturbanceCount, model.Horizon, model.Estimator?.DisturbanceCount ?? 0);
        var spare = new ReplayBatch(size, n, m, p, model.DisturbanceCount, model.Horizon, model.Estimator?.DisturbanceCount ?? 0);
        int workers = options.Value.MaxDegreeOfParallelism > 0 ? options.Value.MaxDegreeOfParallelism : Environment.ProcessorCount;
        var parallel = new ParallelOptions { MaxDegreeOfParallelism = workers, CancellationToken = cancellationToken };
        long rows = 0, failed = 0;
        var depth = sink.NeedsFullPlan ? PlanDepth.Full : PlanDepth.FirstMove;

        // Each worker plans one contiguous run of rows in order, carrying the active limits from row to row:
        // consecutive historian states are alike, so a limited plan mostly starts where the last one ended.
        var warmStarts = new PlanWarmStart[workers];
        var scratches = new Utf8JsonWriter[workers];
        for (int w = 0; w < workers; w++)
        {
            warmStarts[w] = model.CreateWarmStart();
            scratches[w] = new Utf8JsonWriter(Stream.Null, new JsonWriterOptions { Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping });
        }

        // Reading the upload also stops when the host does: a client that keeps sending must not hold the replay
        // past the grace. Planning and writing stop only when the client leaves.
        var stopping = lifetime.ApplicationStopping;
        using var reading = CancellationTokenSource.CreateLinkedTokenSource(cancellationToken, stopping);
        string? cut = null;
        try
        {
            bool filled;
            try
            {
                filled = await source.FillAsync(current, reading.Token);
            }
            catch (OperationCanceledException) when (StoppedByHost(stopping, cancellationToken))
            {
                // Nothing was read whole: an empty replay, cut.
                await sink.StartAsync(cancellationToken);
                return await CompleteAsync(sink, new ReplaySummary(0, 0, [], ReplaySummary.ShutdownReason), cancellationToken);
            }

            var modeErrors = source.ChooseMode(current, model);
            if (modeErrors.Count > 0)
            {
                return new ReplayRun(null, modeErrors);
            }

            // An estimation replay chains one estimate through its rows in time order: the chain runs through each
            // batch on one thread, then its rows are planned in parallel like any replay's.
            var chain = source.Mode == ReplayMode.Measurements ? new EstimationChain(model) : null;
            await sink.StartAsync(cancellationToken);
            while (filled)
            {
                bool fatal = current[current.Count - 1].Fatal;

                // Read ahead on another thread while this batch is planned.
                var next = spare;
                var filling = fatal ? Task.FromResult(false) : Task.Run(() => source.FillAsync(next, reading.Token).AsTask(), reading.Token);
                var batch = current;
                if (chain is not null)
                {
                    // The estimator is cheap and must see the rows in order; the plans, which cost the time, need only
                    // their own row's estimate. So the chain runs through the batch first, then the rows are planned
                    // like any other replay's.
                    for (int i = 0; i < batch.Count; i++)
                    {
                        cancellationToken.ThrowIfCancellationRequested();
                        var row = batch[i];
                        source.Parse(row);
                        chain.Advance(row, source.PathPrefix(row));
                    }
                }

                int runs = Math.Min(workers, batch.Count);
                Parallel.For(
                    0,
                    runs,
                    parallel,
                    w =>
                    {
                        int from = (int)((long)batch.Count * w / runs);
                        int to = (int)((long)batch.Count * (w + 1) / runs);
                        for (int i = from; i < to; i++)
                        {
                            var row = batch[i];
                            if (chain is null)
                            {
                                source.Parse(row);
                            }

                            planner.Run(model, row, depth, PlanRoute.Replay, warmStarts[w]);
                            sink.Format(row, scratches[w]);
                        }
                    });

                await sink.WriteAsync(batch, cancellationToken);
                int batchFailed = 0;
                for (int i = 0; i < batch.Count; i++)
                {
                    if (batch[i].Outcome is null)
                    {
                        batchFailed++;
                    }
                }

                // Counted per batch written, so a replay cut short (client gone, shutdown) still shows what it did.
                metrics.Rows.WithLabels(format, "planned").Inc(batch.Count - batchFailed);
                metrics.Rows.WithLabels(format, "error").Inc(batchFailed);
                failed += batchFailed;
                rows += batch.Count;
                (current, spare) = (spare, current);
                try
                {
                    filled = await filling;
                }
                catch (OperationCanceledException) when (StoppedByHost(stopping, cancellationToken))
                {
                    filled = false;
                    cut = ReplaySummary.ShutdownReason;
                }

                if (filled && stopping.IsCancellationRequested)
                {
                    // A batch read but not planned is dropped: the host is stopping, and its rows were never answered.
                    filled = false;
                    cut = ReplaySummary.ShutdownReason;
                }
            }
        }
        finally
        {
            foreach (var scratch in scratches)
            {
                scratch.Dispose();
            }
        }

        return await CompleteAsync(sink, new ReplaySummary(rows, failed, [], cut), cancellationToken);
    }

    private static bool StoppedByHost(CancellationToken stopping, CancellationToken client) =>
        stopping.IsCancellationRequested && !client.IsCancellationRequested;

    private static async Task<ReplayRun> CompleteAsync(IReplaySink sink, ReplaySummary summary, CancellationToken cancellationToken)
    {
        await sink.CompleteAsync(summary, cancellationToken);
        return new ReplayRun(summary, []);
    }
}
