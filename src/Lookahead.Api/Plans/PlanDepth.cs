namespace Lookahead.Api.Plans;

/// <summary>How much of a plan a caller needs: everything, or only u_0 and the cost (the cheaper first-move path).</summary>
public enum PlanDepth
{
    Full,
    FirstMove,
}
