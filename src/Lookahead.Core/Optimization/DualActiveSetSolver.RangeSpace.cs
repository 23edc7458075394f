namespace Lookahead.Core.Optimization;

public sealed partial class DualActiveSetSolver
{
    /// <summary>
    /// A solve in range-space form: the guesser first when there is one (from the last set on a warm start), then the
    /// range-space iteration, warm from the workspace's last active set when asked and there is one.
    /// </summary>
    /// <param name="factored">On return, whether the workspace holds the factor of the active set found (not so when the guesser found it).</param>
    private QpResult SolveInRangeSpace(ReadOnlySpan<double> rhs, Span<double> x, int maxIterations, QpWorkspace workspace, bool warmStart, out bool factored)
    {
        factored = false;
        bool warm = warmStart && workspace.LastActiveCount > 0;
        int guesses = 0;
        if (guesser is not null)
        {
            var guess = warm ? workspace.Active.AsSpan(0, workspace.LastActiveCount) : default;
            if (guesser.TrySolve(rhs, x, guess, workspace, out int count, out guesses))
            {
                return new QpResult(QpStatus.Optimal, guesses, count, -1);
            }

            // The guesser has used the workspace's active list as scratch: start cold.
            warm = false;
        }

        var result = rangeSpace!.Solve(rhs, x, Math.Max(0, maxIterations - guesses), workspace, warm);
        factored = true;
        return result with { Iterations = result.Iterations + guesses };
    }
}
