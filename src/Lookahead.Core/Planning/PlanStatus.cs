namespace Lookahead.Core.Planning;

/// <summary>How trustworthy a plan is. Anything but <see cref="Optimal"/> must be flagged to the operator.</summary>
public enum PlanStatus
{
    /// <summary>The exact optimum of the stated problem.</summary>
    Optimal,

    /// <summary>The solver stopped at its iteration budget; the inputs are the best point found, moved onto every hard input and rate limit.</summary>
    IterationLimit,

    /// <summary>Hard limits contradict each other; the inputs are the best-effort projection and must not be applied blindly.</summary>
    Infeasible,
}
