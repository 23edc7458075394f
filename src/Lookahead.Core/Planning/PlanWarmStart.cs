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
}
