using System.ComponentModel;
using System.Text.Json;
using System.Text.Json.Serialization;
using Lookahead.Client;
using Spectre.Console;
using Spectre.Console.Cli;

namespace Lookahead.Cli.Commands;

/// <summary>
/// lookahead simulate MODEL REQUEST --out FILE: the chart as the service draws it (SVG), or the run as a table (CSV)
/// written here from the JSON answer, one row per sample with the model's labels as column names.
/// </summary>
public sealed class SimulateCommand : CommandBase<SimulateCommand.Settings>
{
    /// <summary>Strict: a misspelt field in the request file is named here rather than silently dropped.</summary>
    internal static readonly JsonSerializerOptions FileJson = new(JsonSerializerDefaults.Web)
    {
        UnmappedMemberHandling = JsonUnmappedMemberHandling.Disallow,
    };

    public sealed class Settings : ServiceSettings
    {
        [CommandArgument(0, "<MODEL>")]
        [Description("A model id or an alias name")]
        public string Model { get; set; } = "";

        [CommandArgument(1, "<REQUEST>")]
        [Description("The simulation request (JSON)")]
        public string Request { get; set; } = "";

        [CommandOption("-o|--out <FILE>")]
        [Description("Where to write the run")]
        public string Out { get; set; } = "";

        [CommandOption("--format <FORMAT>")]
        [Description("svg or csv (default: from the file's extension)")]
        public string? Format { get; set; }

        public override ValidationResult Validate()
        {
            if (string.IsNullOrEmpty(Out))
            {
                return ValidationResult.Error("--out is required");
            }

            string format = EffectiveFormat;
            return format is "svg" or "csv" ? base.Validate() : ValidationResult.Error($"--format must be svg or csv, not '{format}'");
        }

        internal string EffectiveFormat => (Format ?? Path.GetExtension(Out).TrimStart('.')).ToLowerInvariant();
    }

    protected override async Task<int> RunAsync(IAnsiConsole console, LookaheadClient client, Settings settings, CancellationToken cancellationToken)
    {
        SimulationRequest request;
        try
        {
            request = JsonSerializer.Deserialize<SimulationRequest>(Arguments.ReadFile(settings.Request, "request file"), FileJson)
                ?? throw new CliInputException($"request file '{settings.Request}' is empty");
        }
        catch (JsonException ex)
        {
            throw new CliInputException($"request file '{settings.Request}' is not a simulation request: {ex.Message}", ex);
        }

        string modelId = await Arguments.ModelIdAsync(client, settings.Model, cancellationToken);
        if (settings.EffectiveFormat == "svg")
        {
            await File.WriteAllTextAsync(settings.Out, await client.SimulateChartAsync(modelId, request, cancellationToken), cancellationToken);
        }
        else
        {
            var run = await client.SimulateAsync(modelId, request, cancellationToken);
            var labels = (await client.GetModelAsync(modelId, cancellationToken)).Document.Labels;
            await using var file = File.Create(settings.Out);
            SimulationCsv.Write(file, run, labels);
            console.WriteLine(FormattableString.Invariant($"total cost: {run.TotalCost:G10}"));
            console.WriteLine($"steps not optimal: {run.NonOptimalSteps}");
            Warnings.Write(console, run.Warnings);
        }

        console.WriteLine($"written: {settings.Out}");
        return ExitCodes.Success;
    }
}
