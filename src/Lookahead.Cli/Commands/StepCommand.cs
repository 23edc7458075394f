using System.ComponentModel;
using System.Globalization;
using Lookahead.Client;
using Spectre.Console;
using Spectre.Console.Cli;

namespace Lookahead.Cli.Commands;

/// <summary>
/// lookahead step STATION: one sample. Without --sequence the station's current sequence is read first (fine for a
/// person at a terminal; a program that steps every minute should keep the sequence the last answer gave).
/// </summary>
public sealed class StepCommand : CommandBase<StepCommand.Settings>
{
    public sealed class Settings : ServiceSettings
    {
        [CommandArgument(0, "<STATION>")]
        public string Station { get; set; } = "";

        [CommandOption("--measurement <VALUES>")]
        [Description("The outputs measured now, comma-separated; omit when the reading is missing")]
        public string? Measurement { get; set; }

        [CommandOption("--applied-input <VALUES>")]
        [Description("What the plant received since the last step (omitted: the last suggested move)")]
        public string? AppliedInput { get; set; }

        [CommandOption("--reference <VALUES>")]
        public string? Reference { get; set; }

        [CommandOption("--disturbance <VALUES>")]
        public string? Disturbance { get; set; }

        [CommandOption("--timestamp <ISO8601>")]
        [Description("The plant's time of the measurement")]
        public string? Timestamp { get; set; }

        [CommandOption("--sequence <N>")]
        [Description("The station's current sequence (omitted: read from the station)")]
        public long? Sequence { get; set; }

        [CommandOption("--track")]
        [Description("The operator drives the plant: update the estimate only")]
        public bool Track { get; set; }

        [CommandOption("--bind <MODEL>")]
        [Description("Bind (or re-bind) the station to a model id or alias before stepping")]
        public string? Bind { get; set; }
    }

    protected override async Task<int> RunAsync(IAnsiConsole console, LookaheadClient client, Settings settings, CancellationToken cancellationToken)
    {
        if (settings.Bind is { } model)
        {
            await client.SetStationAsync(settings.Station, model, cancellationToken: cancellationToken);
        }

        long sequence = settings.Sequence ?? (await client.GetStationAsync(settings.Station, cancellationToken)).Sequence;
        DateTimeOffset? timestamp = null;
        if (settings.Timestamp is { } text)
        {
            if (!DateTimeOffset.TryParse(text, CultureInfo.InvariantCulture, DateTimeStyles.RoundtripKind, out var parsed))
            {
                throw new CliInputException($"--timestamp: '{text}' is not an ISO 8601 time");
            }

            timestamp = parsed;
        }

        var step = await client.StepStationAsync(settings.Station, new StationStepRequest
        {
            Sequence = sequence,
            Measurement = Arguments.Numbers(settings.Measurement, "--measurement"),
            AppliedInput = Arguments.Numbers(settings.AppliedInput, "--applied-input"),
            Reference = Arguments.Numbers(settings.Reference, "--reference") is { } r ? VectorOrRows.Held(r) : null,
            Disturbance = Arguments.Numbers(settings.Disturbance, "--disturbance") is { } v ? VectorOrRows.Held(v) : null,
            Timestamp = timestamp,
            Mode = settings.Track ? "track" : null,
        }, cancellationToken);

        console.WriteLine($"sequence: {step.Sequence}");
        console.WriteLine($"model: {step.ModelId}");
        console.WriteLine($"status: {step.Status}");
        console.WriteLine($"applied input: {PlanCommand.Join(step.AppliedInput)}");
        if (step.FirstMove is { } move)
        {
            console.WriteLine($"first move: {PlanCommand.Join(move)}");
        }

        console.WriteLine($"estimate: {PlanCommand.Join(step.Estimate.State)}");
        if (step.MissedSamples > 0)
        {
            console.WriteLine($"missed samples: {step.MissedSamples}");
        }

        Warnings.Write(console, step.Warnings);
        return ExitCodes.Success;
    }
}
