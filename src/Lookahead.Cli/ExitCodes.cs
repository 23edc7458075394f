namespace Lookahead.Cli;

/// <summary>What the tool's exit code says, for scripts.</summary>
public static class ExitCodes
{
    public const int Success = 0;

    /// <summary>The service refused the request (its problem is printed).</summary>
    public const int Refused = 1;

    /// <summary>The command line or a local file was wrong.</summary>
    public const int BadInput = 2;

    /// <summary>A replay ended before its last row (service stopping, connection lost, Ctrl+C): run it again with --resume.</summary>
    public const int Incomplete = 3;
}
