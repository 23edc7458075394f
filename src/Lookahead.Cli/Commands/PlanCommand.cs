using System.ComponentModel;
using System.Globalization;
using System.Text.Json;
using Lookahead.Client;
using Spectre.Console;
using Spectre.Console.Cli;

namespace Lookahead.Cli.Commands;

/// <summary>lookahead plan MODEL: one plan, by model id or alias, from options or a request file.</summary>
public sealed class PlanCommand : CommandBase<PlanCommand.Settings>
{
    public sealed class Settings : ServiceSettings
    {
        [CommandArgument(0, "<MODEL>")]
        [Description("A model id (64 hex digits) or an alias name")]
        public string Model { get; set; } = "";

        [CommandOption("--state <VALUES>")]
        [Description("Measured state, comma-separated (write --state=-1,2 when the first value is negative)")]
        public string? State { get; set; }

        [CommandOption("--previous-input <VALUES>")]
        [Description("The input applied now, comma-separated")]
        public string? PreviousInput { get; set; }

        [CommandOption("--reference <VALUES>")]
        [Description("Setpoint held over the horizon, comma-separated")]
        public string? Reference { get; set; }

        [CommandOption("--disturbance <VALUES>")]
        [Description("Measured disturbances held over the horizon, comma-separated")]
        public string? Disturbance { get; set; }

        [CommandOption("--request <FILE>")]
        [Description("A plan request (JSON) instead of the options above")]
        public string? Request { get; set; }

        [CommandOption("--svg <FILE>")]
        [Description("Also write the plan's chart to this file")]
        public string? Svg { get; set; }

        public override ValidationResult Validate()
        {
            if ((State is null) == (Request is null))
            {
                return ValidationResult.Error("give --state or --request (one of them)");
            }

            return base.Validate();
        }
    }

    protected override async Task<int> RunAsync(IAnsiConsole console, LookaheadClient client, Settings settings, CancellationToken cancellationToken)
    {
        var request = Request(settings);
        bool byId = Arguments.IsModelId(settings.Model);
        var plan = byId
            ? await client.PlanAsync(settings.Model, request, cancellationToken)
            : await client.PlanWithAliasAsync(settings.Model, request, cancellationToken);

        console.WriteLine($"model: {plan.ModelId}");
        console.WriteLine($"status: {plan.Status}");
        console.WriteLine($"first move: {Join(plan.FirstMove)}");
        console.WriteLine(FormattableString.Invariant($"cost: {plan.Cost:G10}"));
        if (plan.Target is { } target)
        {
            console.WriteLine($"target output: {Join(target.Output)}");
        }

        Warnings.Write(console, plan.Warnings);
        if (settings.Svg is { } svgPath)
        {
            string model = byId ? settings.Model : plan.ModelId;
            await File.WriteAllTextAsync(svgPath, await client.PlanChartAsync(model, request, cancellationToken), cancellationToken);
            console.WriteLine($"chart: {svgPath}");
        }

        return ExitCodes.Success;
    }

    private static PlanRequest Request(Settings settings)
    {
        if (settings.Request is { } path)
        {
            try
            {
                return JsonSerializer.Deserialize<PlanRequest>(Arguments.ReadFile(path, "request file"), SimulateCommand.FileJson)
                    ?? throw new CliInputException($"request file '{path}' is empty");
            }
            catch (JsonException ex)
            {
                throw new CliInputException($"request file '{path}' is not a plan request: {ex.Message}", ex);
            }
        }

        return new PlanRequest
        {
            State = Arguments.Numbers(settings.State, "--state"),
            PreviousInput = Arguments.Numbers(settings.PreviousInput, "--previous-input"),
            Reference = Arguments.Numbers(settings.Reference, "--reference") is { } r ? VectorOrRows.Held(r) : null,
            Disturbance = Arguments.Numbers(settings.Disturbance, "--disturbance") is { } v ? VectorOrRows.Held(v) : null,
        };
    }

    internal static string Join(IEnumerable<double> values) =>
        string.Join(", ", values.Select(v => v.ToString("G10", CultureInfo.InvariantCulture)));
}
