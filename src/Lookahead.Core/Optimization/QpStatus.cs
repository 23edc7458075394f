namespace Lookahead.Core.Optimization;

public enum QpStatus
{
    /// <summary>Every constraint holds to tolerance and every inequality multiplier is nonnegative.</summary>
    Optimal,

    /// <summary>The iteration cap was reached; the point is dual feasible but may violate constraints.</summary>
    IterationLimit,

    /// <summary>The constraints admit no point (a violated constraint could not be satisfied by any step).</summary>
    Infeasible,

    /// <summary>A step length came out not a number: the data's scale overflowed the arithmetic; the point is no answer.</summary>
    NotFinite,
}
