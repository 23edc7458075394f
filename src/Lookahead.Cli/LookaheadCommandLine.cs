using Lookahead.Cli.Commands;
using Spectre.Console.Cli;

namespace Lookahead.Cli;

/// <summary>The tool's entry: the commands and how they are reached. Tests call it with a host that reaches the service in process.</summary>
public static class LookaheadCommandLine
{
    public static async Task<int> RunAsync(IReadOnlyList<string> args, CliHost host, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(host);
        var app = new CommandApp();
        app.Configure(config =>
        {
            config.SetApplicationName("lookahead");
            config.ConfigureConsole(host.Console);
            config.AddCommand<RegisterCommand>("register")
                .WithData(host)
                .WithDescription("Register a model from a JSON file; prints its id, diagnostics and warnings")
                .WithExample("register", "model.json");
            config.AddCommand<PlanCommand>("plan")
                .WithData(host)
                .WithDescription("Plan from a state (or a request file) with a model id or an alias")
                .WithExample("plan", "cold-store-demo", "--state=-17.5,-18.5,-19.5", "--previous-input=30,30,0");
            config.AddCommand<SimulateCommand>("simulate")
                .WithData(host)
                .WithDescription("Run a closed-loop simulation from a request file and write it as SVG or CSV")
                .WithExample("simulate", "cold-store-demo", "run.json", "--out", "run.svg");
            config.AddCommand<StepCommand>("step")
                .WithData(host)
                .WithDescription("Send one sample to a station and print the move to apply")
                .WithExample("step", "dock-loop", "--measurement=-19.2,-19.6,-19.9", "--applied-input=30,30,0");
            config.AddCommand<ReplayCommand>("replay")
                .WithData(host)
                .WithDescription("Replay a historian CSV export; the answers go to a CSV file that --resume continues")
                .WithExample("replay", "cold-store-demo", "history.csv", "--out", "moves.csv", "--map", "TI-101=zone_a_temp");
        });

        return await app.RunAsync(args, cancellationToken);
    }
}
