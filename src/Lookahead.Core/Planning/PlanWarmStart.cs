using Lookahead.Core.Optimization;

namespace Lookahead.Core.Planning;

/// <summary>
/// What a sequence of plans on one model carries from one plan to the next: for each problem variant (with and
/// without a previous input) the active set the last limited plan ended with and its factorisation. Plans of
/// consecutive, similar states (a historian export, a closed loop, a station) then start where the last one ended
/// instead of from no active limit; the plan itself is the same as a cold start's. One sequence at a time: not
/// thread-safe (give each worker its own, from <see cref="CompiledModel.CreateWarmStart"/>).
/// </summary>
public sealed class PlanWarmStart
{
    internal PlanWarmStart(CompiledModel model)
    {
        Model = model;
    }

    internal CompiledModel Model { get; }

    internal QpWorkspace? WithoutPrevious { get; set; }

    internal QpWorkspace? WithPrevious { get; set; }

    /// <summary>
    /// Active-set changes up to which a warm-started plan counts as cheap. On the served demo a warm plan with 6–10
    /// changes took 247 µs on average and a cold interior-point plan 205 µs; a noisy trajectory needed 3 at the median,
    /// independent states 87 (docs/performance.md).
    /// </summary>
    internal const int CheapIterations = 10;

    /// <summary>Longest run of cold plans after costly warm ones, so a sequence that settles again is soon warm again.</summary>
    internal const int MaxColdRun = 64;

    private int coldLeft;
    private int nextColdRun = 1;
    private int costlyInARow;

    /// <summary>Whether this plan should be planned cold (and counts it against the current run of cold plans).</summary>
    internal bool TakeColdTurn()
    {
        if (coldLeft == 0)
        {
            return false;
        }

        coldLeft--;
        return true;
    }

    /// <summary>
    /// Records a warm-started plan's active-set changes. A single costly plan is a jump (a load step, a new setpoint)
    /// that the next warm start follows cheaply; from the second costly plan in a row on, each starts a run of cold
    /// plans, doubling while they keep coming.
    /// </summary>
    internal void Record(int iterations)
    {
        if (iterations <= CheapIterations)
        {
            costlyInARow = 0;
            nextColdRun = 1;
            return;
        }

        if (++costlyInARow < 2)
        {
            return;
        }

        coldLeft = nextColdRun;
        nextColdRun = Math.Min(2 * nextColdRun, MaxColdRun);
    }
}
