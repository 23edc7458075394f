namespace Lookahead.Core.Tests.Numerics;

/// <summary>
/// Runs a computation that must end on its own. A generous deadline turns a hang into a failed test
/// instead of a blocked run; it is not a timing check (the computations under test take milliseconds).
/// </summary>
public static class Bounded
{
    private static readonly TimeSpan Deadline = TimeSpan.FromSeconds(60);

    public static T Run<T>(Func<T> computation) =>
        Task.Run(computation).WaitAsync(Deadline).GetAwaiter().GetResult();

    public static void Run(Action computation) =>
        Task.Run(computation).WaitAsync(Deadline).GetAwaiter().GetResult();
}
