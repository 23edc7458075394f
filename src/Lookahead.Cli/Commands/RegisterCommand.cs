using System.ComponentModel;
using System.Globalization;
using Lookahead.Client;
using Spectre.Console;
using Spectre.Console.Cli;

namespace Lookahead.Cli.Commands;

/// <summary>lookahead register FILE: sends the document as written, so the service judges every field of it.</summary>
public sealed class RegisterCommand : CommandBase<RegisterCommand.Settings>
{
    public sealed class Settings : ServiceSettings
    {
        [CommandArgument(0, "<FILE>")]
        [Description("The model document (JSON)")]
        public string File { get; set; } = "";
    }

    protected override async Task<int> RunAsync(IAnsiConsole console, LookaheadClient client, Settings settings, CancellationToken cancellationToken)
    {
        string json = Arguments.ReadFile(settings.File, "model file");
        var model = await client.RegisterModelJsonAsync(json, cancellationToken);
        console.WriteLine($"id: {model.Id}");
        console.WriteLine(model.Created ? "registered: new" : "registered: already known (same content, same id)");
        var d = model.Dimensions;
        console.WriteLine(FormattableString.Invariant($"dimensions: n={d.N} m={d.M} p={d.P} horizon={d.Horizon} decisionVariables={d.DecisionVariables}"));

        var diagnostics = new Table().AddColumn("diagnostic").AddColumn("value");
        var g = model.Diagnostics;
        diagnostics.AddRow("controllable", Yes(g.Controllable) + $" (rank {g.ControllabilityRank})");
        diagnostics.AddRow("stabilisable", Yes(g.Stabilisable));
        diagnostics.AddRow("detectable", Yes(g.Detectable));
        diagnostics.AddRow("open-loop spectral radius", Number(g.OpenLoopSpectralRadius));
        diagnostics.AddRow("closed-loop spectral radius", Number(g.ClosedLoopSpectralRadius));
        diagnostics.AddRow("Hessian condition", Number(g.HessianCondition));
        diagnostics.AddRow("Riccati residual", Number(g.RiccatiResidual));
        if (g.Estimator is { } e)
        {
            diagnostics.AddRow("estimator", $"{e.DisturbanceModel} disturbances ({e.DisturbanceCount}), spectral radius {Number(e.SpectralRadius)}");
        }

        console.Write(diagnostics);
        Warnings.Write(console, model.Warnings);
        if (model.Warnings.Count == 0)
        {
            console.WriteLine("warnings: none");
        }

        return ExitCodes.Success;
    }

    private static string Yes(bool value) => value ? "yes" : "no";

    private static string Number(double? value) => value is double v ? v.ToString("G6", CultureInfo.InvariantCulture) : "–";
}
