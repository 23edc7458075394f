using System.Diagnostics;
using System.Text.Json;
using Lookahead.Api.Configuration;
using Lookahead.Api.Observability;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;
using Microsoft.Extensions.Options;

namespace Lookahead.Api.Replay;

/// <summary>
/// The replay pipeline: while one batch is planned in parallel (the compiled model is thread-safe) the next is
/// read, and results are written strictly in input order. Two batches of slots are all the memory it needs,
/// whatever the number of rows.
/// </summary>
public sealed class ReplayRunner(IOptions<ReplayOptions> options, LookaheadMetrics metrics)
{
    internal async Task<ReplaySummary> RunAsync(IReplaySource source, IReplaySink sink, CompiledModel model, string format, CancellationToken cancellationToken)
    {
        int size = options.Value.BatchSize;
        int n = model.StateCount, m = model.InputCount, p = model.OutputCount;
        var current = new ReplayBatch(size, n, m, p);
        var spare = new ReplayBatch(size, n, m, p);
        var parallel = new ParallelOptions
        {
            MaxDegreeOfParallelism = options.Value.MaxDegreeOfParallelism > 0 ? options.Value.MaxDegreeOfParallelism : Environment.ProcessorCount,
            CancellationToken = cancellationToken,
        };
        var duration = metrics.PlanDuration.WithLabels("replay");
        long rows = 0, failed = 0;

        await sink.StartAsync(cancellationToken);
        var filling = source.FillAsync(current, cancellationToken).AsTask();
        while (await filling)
        {
            bool fatal = current[current.Count - 1].Fatal;

            // Read ahead on another thread while this batch is planned.
            var next = spare;
            filling = fatal ? Task.FromResult(false) : Task.Run(() => source.FillAsync(next, cancellationToken).AsTask(), cancellationToken);
            var batch = current;
            Parallel.For(
                0,
                batch.Count,
                parallel,
                () => new Utf8JsonWriter(Stream.Null, new JsonWriterOptions { Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping }),
                (i, _, scratch) =>
                {
                    var row = batch[i];
                    source.Parse(row);
                    if (row.Errors.Count == 0)
                    {
                        Solve(model, row, sink.NeedsFullPlan, duration);
                    }

                    sink.Format(row, scratch);
                    return scratch;
                },
                scratch => scratch.Dispose());

            await sink.WriteAsync(batch, cancellationToken);
            for (int i = 0; i < batch.Count; i++)
            {
                if (batch[i].Outcome is null)
                {
                    failed++;
                }
            }

            rows += batch.Count;
            (current, spare) = (spare, current);
        }

        metrics.ReplayRows.WithLabels(format, "planned").Inc(rows - failed);
        metrics.ReplayRows.WithLabels(format, "error").Inc(failed);
        var summary = new ReplaySummary(rows, failed, []);
        await sink.CompleteAsync(summary, cancellationToken);
        return summary;
    }

    private static void Solve(CompiledModel model, ReplayRow row, bool fullPlan, Prometheus.Histogram.Child duration)
    {
        long started = Stopwatch.GetTimestamp();
        try
        {
            var request = new PlanRequest(row.State, row.HasReference ? row.Reference : null, row.HasPreviousInput ? row.PreviousInput : null);
            if (fullPlan)
            {
                var plan = model.Plan(request);
                row.Plan = plan;
                plan.Input(0).CopyTo(row.FirstMove);
                row.Outcome = new FirstMoveResult(plan.Status, plan.Cost, plan.Warnings);
            }
            else
            {
                // Historians mostly want u_0: the first-move path skips the trajectory when the model allows it.
                row.Outcome = model.FirstMove(request, row.FirstMove);
            }

            duration.Observe(Stopwatch.GetElapsedTime(started).TotalSeconds);
        }
        catch (ModelValidationException ex)
        {
            foreach (var error in ex.Errors)
            {
                row.AddError(error.Path, error.Reason);
            }
        }
    }
}
