using Lookahead.Cli;
using Spectre.Console;

namespace Lookahead.Client.Tests.Support;

/// <summary>Runs the command-line tool's entry against the in-process service and captures what it prints.</summary>
public static class Cli
{
    public static async Task<(int Exit, string Output)> RunAsync(ServiceFactory service, params string[] args)
    {
        var writer = new StringWriter();
        var console = AnsiConsole.Create(new AnsiConsoleSettings
        {
            Out = new AnsiConsoleOutput(writer),
            Ansi = AnsiSupport.No,
            ColorSystem = ColorSystemSupport.NoColors,
            Interactive = InteractionSupport.No,
        });
        console.Profile.Width = 200;
        var host = new CliHost(console, service.CreateServerHandler());
        int exit = await LookaheadCommandLine.RunAsync([.. args, "--service", service.Server.BaseAddress.ToString()], host);
        return (exit, writer.ToString());
    }

    /// <summary>The value after "name: " on the first line that starts with it.</summary>
    public static string Line(string output, string name)
    {
        string prefix = name + ": ";
        var line = output.Split('\n').Select(l => l.TrimEnd('\r')).FirstOrDefault(l => l.StartsWith(prefix, StringComparison.Ordinal));
        return line?[prefix.Length..] ?? throw new Xunit.Sdk.XunitException($"no '{name}:' line in:\n{output}");
    }
}
