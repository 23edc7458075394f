namespace Lookahead.Cli;

/// <summary>The tool's process entry; everything else is in <see cref="LookaheadCommandLine"/>, which tests call directly.</summary>
internal static class EntryPoint
{
    public static async Task<int> Main(string[] args)
    {
        // Ctrl+C cancels the running call; a replay then keeps what it has written, ready for --resume.
        using var cancel = new CancellationTokenSource();
        Console.CancelKeyPress += (_, e) =>
        {
            e.Cancel = true;
            cancel.Cancel();
        };

        return await LookaheadCommandLine.RunAsync(args, CliHost.ForConsole(), cancel.Token);
    }
}
