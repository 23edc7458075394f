using System.ComponentModel;
using System.Globalization;
using System.IO.Pipelines;
using CsvHelper;
using Lookahead.Cli.Replay;
using Lookahead.Client;
using Spectre.Console;
using Spectre.Console.Cli;

namespace Lookahead.Cli.Commands;

/// <summary>
/// lookahead replay MODEL INPUT --out OUTPUT: streams a historian CSV export (its own delimiter and decimal
/// separator, tags mapped to labels) to the service and writes the answers to OUTPUT in the same dialect. With
/// --resume an existing OUTPUT is continued: the rows it holds are skipped in the input and the rest appended.
/// </summary>
public sealed class ReplayCommand : CommandBase<ReplayCommand.Settings>
{
    public sealed class Settings : ServiceSettings
    {
        [CommandArgument(0, "<MODEL>")]
        [Description("A model id or an alias name (an alias is resolved once, at the start)")]
        public string Model { get; set; } = "";

        [CommandArgument(1, "<INPUT>")]
        [Description("The historian's CSV export")]
        public string Input { get; set; } = "";

        [CommandOption("-o|--out <FILE>")]
        [Description("Where the answers go (CSV in the input's dialect)")]
        public string Out { get; set; } = "";

        [CommandOption("--delimiter <CHAR>")]
        [Description(", ; | or tab (default: sniffed from the input)")]
        public string? Delimiter { get; set; }

        [CommandOption("--decimal-comma")]
        [Description("Numbers are written with a decimal comma (default: sniffed)")]
        public bool DecimalComma { get; set; }

        [CommandOption("--decimal-point")]
        [Description("Numbers are written with a decimal point (default: sniffed)")]
        public bool DecimalPoint { get; set; }

        [CommandOption("--map <TAG=LABEL>")]
        [Description("Read the historian column TAG as LABEL (a state label, prev_<input>, y_<output>, …); repeat it")]
        public string[]? Map { get; set; }

        [CommandOption("--map-file <FILE>")]
        [Description("A file of tag=label lines")]
        public string? MapFile { get; set; }

        [CommandOption("--resume")]
        [Description("Continue an existing output: skip the rows it holds, append the rest")]
        public bool Resume { get; set; }

        [CommandOption("--overwrite")]
        [Description("Start an existing output over")]
        public bool Overwrite { get; set; }

        [CommandOption("--no-progress")]
        [Description("No live progress bar (a line every 10,000 rows instead)")]
        public bool NoProgress { get; set; }

        public override ValidationResult Validate()
        {
            if (string.IsNullOrEmpty(Out))
            {
                return ValidationResult.Error("--out is required");
            }

            if (DecimalComma && DecimalPoint)
            {
                return ValidationResult.Error("give --decimal-comma or --decimal-point, not both");
            }

            return Resume && Overwrite ? ValidationResult.Error("give --resume or --overwrite, not both") : base.Validate();
        }
    }

    protected override async Task<int> RunAsync(IAnsiConsole console, LookaheadClient client, Settings settings, CancellationToken cancellationToken)
    {
        if (!File.Exists(settings.Input))
        {
            throw new CliInputException($"input '{settings.Input}' does not exist");
        }

        var dialect = Dialect(settings);
        console.WriteLine($"dialect: {dialect}");
        var tags = TagMap.Load(settings.MapFile, settings.Map);
        string modelId = await Arguments.ModelIdAsync(client, settings.Model, cancellationToken);
        var columns = ModelColumns.For(await client.GetModelAsync(modelId, cancellationToken));

        var resume = ResumePoint.None;
        if (File.Exists(settings.Out))
        {
            if (settings.Resume)
            {
                resume = ResumePoint.Read(settings.Out, dialect);
                console.WriteLine($"resuming: {resume.Rows} rows already in {settings.Out} ({resume.FailedRows} errors)");
            }
            else if (!settings.Overwrite)
            {
                throw new CliInputException($"output '{settings.Out}' exists: give --resume to continue it or --overwrite to start over");
            }
        }

        await using var upload = await OpenUploadAsync(settings.Input, dialect, tags, columns, cancellationToken);
        foreach (string tag in tags.Unused(upload.OriginalHeader))
        {
            console.MarkupLineInterpolated($"[yellow]warning[/] the input has no column '{tag}' to map");
        }

        var progress = new ReplayProgress(console, live: !settings.NoProgress && console.Profile.Capabilities.Interactive);
        var outcome = await RunReplayAsync(client, modelId, upload, settings.Out, dialect, resume, progress, cancellationToken);
        console.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"replayed {progress.Rows:N0} rows ({progress.Errors:N0} errors) in {progress.Elapsed.TotalSeconds:F1} s, {progress.RowsPerSecond:N0} rows/s; output: {settings.Out} holds {resume.Rows + progress.Rows:N0} rows"));
        switch (outcome)
        {
            case Outcome.Complete:
                return ExitCodes.Success;
            case Outcome.ServiceStopped:
                console.MarkupLine("[yellow]the service stopped before the last row[/]: run the same command with --resume to continue");
                return ExitCodes.Incomplete;
            default:
                console.MarkupLine("[yellow]the replay was broken off[/]: run the same command with --resume to continue");
                return ExitCodes.Incomplete;
        }
    }

    private static CsvDialect Dialect(Settings settings)
    {
        var sniffed = DialectSniffer.Sniff(settings.Input);
        char delimiter = CsvDialect.ParseDelimiter(settings.Delimiter) ?? sniffed.Delimiter;
        bool decimalComma = settings.DecimalComma || (!settings.DecimalPoint && sniffed.DecimalComma && delimiter != ',');
        if (decimalComma && delimiter == ',')
        {
            throw new CliInputException("a decimal comma needs another delimiter than the comma (give --delimiter)");
        }

        return new CsvDialect(delimiter, decimalComma);
    }

    private static async Task<HistorianUpload> OpenUploadAsync(string input, CsvDialect dialect, TagMap tags, ModelColumns columns, CancellationToken cancellationToken)
    {
        try
        {
            return await HistorianUpload.OpenAsync(input, dialect, tags, columns, cancellationToken);
        }
        catch (CsvFormatException ex)
        {
            throw new CliInputException($"input '{input}': the header could not be read: {ex.Message}", ex);
        }
    }

    private enum Outcome
    {
        Complete,
        ServiceStopped,
        BrokenOff,
    }

    /// <summary>
    /// The upload is written into a pipe by one task while the answers are read and written out here: both sides
    /// stream, and a refusal or a cut answer stops the upload at once.
    /// </summary>
    private static async Task<Outcome> RunReplayAsync(
        LookaheadClient client, string modelId, HistorianUpload upload, string outputPath, CsvDialect dialect, ResumePoint resume, ReplayProgress progress, CancellationToken cancellationToken)
    {
        var pipe = new Pipe(new PipeOptions(pauseWriterThreshold: 1 << 20, resumeWriterThreshold: 1 << 19));
        using var stop = CancellationTokenSource.CreateLinkedTokenSource(cancellationToken);
        var producer = Task.Run(async () =>
        {
            try
            {
                await upload.WriteAsync(pipe.Writer.AsStream(leaveOpen: true), resume.Rows, stop.Token);
                await pipe.Writer.CompleteAsync();
            }
            catch (Exception ex)
            {
                await pipe.Writer.CompleteAsync(ex);
                throw;
            }
        }, CancellationToken.None);

        await using var output = ReplayOutput.Open(outputPath, dialect, resume, upload.PassThrough);
        var replay = client.ReplayCsvAsync(modelId, pipe.Reader.AsStream(), stop.Token);
        Outcome outcome;
        Exception? failure = null;
        try
        {
            await progress.RunAsync(async () =>
            {
                await foreach (var record in replay)
                {
                    await output.WriteAsync(record, stop.Token);
                    progress.Row(record.Status == "error", Done(upload, record.Row));
                }
            });
            var summary = replay.Summary!;
            await output.WriteSummaryAsync(resume.Rows + progress.Rows, resume.FailedRows + progress.Errors, summary.Complete, CancellationToken.None);
            outcome = summary.Complete ? Outcome.Complete : Outcome.ServiceStopped;
        }
        catch (ReplayCutException)
        {
            outcome = Outcome.BrokenOff;
        }
        catch (OperationCanceledException) when (cancellationToken.IsCancellationRequested)
        {
            outcome = Outcome.BrokenOff;
        }
        catch (Exception ex)
        {
            failure = ex;
            outcome = Outcome.BrokenOff;
        }
        finally
        {
            await stop.CancelAsync();
        }

        // A failure on the reading side (a malformed input line, a resume into a shorter input) is the real cause of
        // whatever the upload then did to the answer, so it is the one reported.
        try
        {
            await producer;
        }
        catch (CliInputException)
        {
            throw;
        }
        catch (CsvFormatException ex)
        {
            throw new CliInputException($"input: a line could not be read (the rows before it are in the output; fix it and --resume): {ex.Message}", ex);
        }
        catch (Exception) when (failure is not null || outcome != Outcome.Complete)
        {
            // The upload was stopped because the answer ended; the answer's outcome says what happened.
        }
        finally
        {
            await pipe.Reader.CompleteAsync();
        }

        if (failure is not null)
        {
            System.Runtime.ExceptionServices.ExceptionDispatchInfo.Capture(failure).Throw();
        }

        return outcome;
    }

    /// <summary>The share of the input file behind the answered rows: bytes per row so far, times rows answered.</summary>
    private static double Done(HistorianUpload upload, long answered)
    {
        long sent = upload.RowsSent;
        if (sent == 0 || upload.TotalBytes == 0)
        {
            return 0;
        }

        double perRow = (double)upload.BytesRead / sent;
        return Math.Min(1.0, answered * perRow / upload.TotalBytes);
    }
}
