using System.Diagnostics;
using System.Globalization;
using Spectre.Console;

namespace Lookahead.Cli.Replay;

/// <summary>
/// What a replay shows while it runs: rows answered, rows per second, error rows and the time left (from the share of
/// the input file sent and answered). A live bar on a terminal; on a redirected console a line every
/// <see cref="LineEvery"/> rows, so logs stay readable.
/// </summary>
public sealed class ReplayProgress
{
    private const long LineEvery = 10_000;
    private readonly IAnsiConsole console;
    private readonly bool live;
    private readonly Stopwatch clock = Stopwatch.StartNew();
    private ProgressTask? bar;

    public ReplayProgress(IAnsiConsole console, bool live)
    {
        this.console = console;
        this.live = live;
    }

    public long Rows { get; private set; }

    public long Errors { get; private set; }

    public double RowsPerSecond => clock.Elapsed.TotalSeconds > 0 ? Rows / clock.Elapsed.TotalSeconds : 0;

    public TimeSpan Elapsed => clock.Elapsed;

    /// <summary>Runs <paramref name="work"/> under the display.</summary>
    public async Task RunAsync(Func<Task> work)
    {
        if (!live)
        {
            await work();
            return;
        }

        await console.Progress()
            .AutoClear(false)
            .Columns(new TaskDescriptionColumn(), new ProgressBarColumn(), new PercentageColumn(), new RemainingTimeColumn(), new SpinnerColumn())
            .StartAsync(async context =>
            {
                bar = context.AddTask("replay", maxValue: 1.0);
                await work();
                bar.Value = bar.MaxValue;
                bar.StopTask();
            });
    }

    /// <summary>One more row answered; <paramref name="done"/> is the share of the input behind it (0…1).</summary>
    public void Row(bool error, double done)
    {
        Rows++;
        if (error)
        {
            Errors++;
        }

        if (bar is not null)
        {
            if (Rows % 256 == 0 || error)
            {
                bar.Description = string.Create(CultureInfo.InvariantCulture, $"{Rows:N0} rows · {RowsPerSecond:N0} rows/s · {Errors:N0} errors");
                bar.Value = Math.Clamp(done, 0, 1);
            }
        }
        else if (Rows % LineEvery == 0)
        {
            string left = done > 0 && done < 1 ? FormatSpan(TimeSpan.FromSeconds(clock.Elapsed.TotalSeconds * (1 - done) / done)) : "–";
            console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"rows {Rows:N0} ({done:P0}) · {RowsPerSecond:N0} rows/s · {Errors:N0} errors · about {left} left"));
        }
    }

    private static string FormatSpan(TimeSpan span) => span.TotalHours >= 1
        ? span.ToString(@"h\:mm\:ss", CultureInfo.InvariantCulture)
        : span.ToString(@"m\:ss", CultureInfo.InvariantCulture);
}
