namespace Lookahead.Api.Plans;

/// <summary>Which route a plan came through, for the metrics' endpoint label.</summary>
public enum PlanRoute
{
    /// <summary>POST …/plan, for a model id or an alias.</summary>
    Plan,

    /// <summary>A row of POST …/plans.</summary>
    Replay,

    /// <summary>A station's step.</summary>
    Station,
}
