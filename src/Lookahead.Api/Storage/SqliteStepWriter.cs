using System.Threading.Channels;
using Microsoft.Data.Sqlite;

namespace Lookahead.Api.Storage;

/// <summary>
/// Writes station steps for the SQLite store through one connection, many steps to a transaction: whatever steps
/// are waiting when the previous transaction ends go into the next, so one fsync makes a whole group durable. Each
/// step's caller hears its outcome only after the transaction holding it has committed, so no answer precedes its
/// commit. Steps are independent inside a group: a step whose guard fails writes nothing and leaves the others be.
/// </summary>
internal sealed class SqliteStepWriter : IAsyncDisposable
{
    /// <summary>Steps per transaction at most: bounds how long one group keeps the write lock from registrations.</summary>
    public const int MaxGroup = 256;

    private readonly Func<CancellationToken, Task<SqliteConnection>> open;
    private readonly Action ensureFileInPlace;
    private readonly Channel<Pending> queue = Channel.CreateUnbounded<Pending>(new UnboundedChannelOptions { SingleReader = true });
    private readonly Task writing;

    /// <param name="open">Opens a configured connection to the store's file.</param>
    /// <param name="ensureFileInPlace">Throws when the file was deleted or replaced: checked before every group, as the writer keeps its connection.</param>
    public SqliteStepWriter(Func<CancellationToken, Task<SqliteConnection>> open, Action ensureFileInPlace)
    {
        this.open = open;
        this.ensureFileInPlace = ensureFileInPlace;
        writing = Task.Run(WriteAsync);
    }

    /// <summary>Queues the step and completes once its group has committed: true when it was written, false when its guard failed.</summary>
    public Task<bool> CommitAsync(StationCommit commit)
    {
        var pending = new Pending(commit, new TaskCompletionSource<bool>(TaskCreationOptions.RunContinuationsAsynchronously));
        ObjectDisposedException.ThrowIf(!queue.Writer.TryWrite(pending), this);
        return pending.Outcome.Task;
    }

    public async ValueTask DisposeAsync()
    {
        queue.Writer.TryComplete();
        await writing;
    }

    private async Task WriteAsync()
    {
        var group = new List<Pending>(MaxGroup);
        SqliteConnection? connection = null;
        try
        {
            while (await queue.Reader.WaitToReadAsync())
            {
                group.Clear();
                while (group.Count < MaxGroup && queue.Reader.TryRead(out var next))
                {
                    group.Add(next);
                }

                try
                {
                    ensureFileInPlace();
                    connection ??= await open(CancellationToken.None);
                    var written = Write(connection, group);
                    for (int i = 0; i < group.Count; i++)
                    {
                        group[i].Outcome.TrySetResult(written[i]);
                    }
                }
                catch (Exception ex)
                {
                    // The group's transaction rolled back: none of its steps is durable, and each caller is told so.
                    foreach (var pending in group)
                    {
                        pending.Outcome.TrySetException(ex);
                    }

                    // A broken connection is not reused; the next group opens a new one.
                    if (connection is not null)
                    {
                        await connection.DisposeAsync();
                        connection = null;
                    }
                }
            }
        }
        finally
        {
            if (connection is not null)
            {
                await connection.DisposeAsync();
            }
        }
    }

    private static bool[] Write(SqliteConnection connection, List<Pending> group)
    {
        var written = new bool[group.Count];

        // BEGIN IMMEDIATE: the group takes the write lock up front, as a single step would.
        using var transaction = connection.BeginTransaction(deferred: false);
        using var update = connection.CreateCommand();
        update.Transaction = transaction;
        update.CommandText = """
            UPDATE stations SET model_id = $model, sequence = $sequence, step_count = $steps, estimate = $estimate,
                last_applied_input = $applied, last_first_move = $move, last_request_hash = $hash, last_answer = $answer,
                last_timestamp = $timestamp, updated_at = $at
            WHERE tenant = $tenant AND name = $name AND sequence = $expected AND model_id = $expectedModel AND model_reference = $reference
                AND detail = $detail
            """;
        using var log = connection.CreateCommand();
        log.Transaction = transaction;
        log.CommandText = """
            INSERT OR REPLACE INTO station_steps (tenant, name, sequence, stepped_at, request, answer) VALUES ($tenant, $name, $sequence, $at, $request, $answer);
            DELETE FROM station_steps WHERE tenant = $tenant AND name = $name AND sequence <= $sequence - $keep;
            """;
        for (int i = 0; i < group.Count; i++)
        {
            var commit = group[i].Commit;
            update.Parameters.Clear();
            SqliteModelStore.AddStation(update, commit.Next);
            update.Parameters.AddWithValue("$expected", commit.ExpectedSequence);
            update.Parameters.AddWithValue("$expectedModel", commit.ExpectedModelId);
            written[i] = update.ExecuteNonQuery() == 1;
            if (written[i] && commit.Entry is { } entry)
            {
                log.Parameters.Clear();
                log.Parameters.AddWithValue("$tenant", commit.Next.Tenant);
                log.Parameters.AddWithValue("$name", entry.Name);
                log.Parameters.AddWithValue("$sequence", entry.Sequence);
                log.Parameters.AddWithValue("$at", StoreTime.ToStored(entry.SteppedAt));
                log.Parameters.AddWithValue("$request", entry.Request);
                log.Parameters.AddWithValue("$answer", entry.Answer);
                log.Parameters.AddWithValue("$keep", commit.HistoryLength);
                log.ExecuteNonQuery();
            }
        }

        transaction.Commit();
        return written;
    }

    private sealed record Pending(StationCommit Commit, TaskCompletionSource<bool> Outcome);
}
