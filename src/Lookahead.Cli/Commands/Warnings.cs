using Lookahead.Client;
using Spectre.Console;

namespace Lookahead.Cli.Commands;

internal static class Warnings
{
    /// <summary>One line per warning: the code (what alarms key on) and the sentence.</summary>
    public static void Write(IAnsiConsole console, IReadOnlyList<ServiceWarning> warnings)
    {
        foreach (var warning in warnings)
        {
            console.MarkupLineInterpolated($"[yellow]warning[/] {warning.Code}: {warning.Message}");
        }
    }
}
