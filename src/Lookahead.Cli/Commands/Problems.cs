using Lookahead.Client;
using Spectre.Console;

namespace Lookahead.Cli.Commands;

/// <summary>Prints a refusal: status, title, detail, each field path with its reason, and the trace id to find it in the log.</summary>
internal static class Problems
{
    public static void Write(IAnsiConsole console, LookaheadProblemException problem)
    {
        console.MarkupLineInterpolated($"[red]refused:[/] {(int)problem.Status} {problem.Title ?? ""}");
        if (!string.IsNullOrEmpty(problem.Detail))
        {
            console.WriteLine(problem.Detail);
        }

        foreach (var error in problem.Errors)
        {
            console.MarkupLineInterpolated($"  [yellow]{error.Path}[/]: {error.Reason}");
        }

        if (problem.TraceId is { Length: > 0 } trace)
        {
            console.WriteLine($"trace: {trace}");
        }
    }
}
