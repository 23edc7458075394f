using System.ComponentModel.DataAnnotations;

namespace Lookahead.Api.Catalog;

/// <summary>How much work one limited plan may take ("Planning" section); compiled into every model the service loads.</summary>
public sealed class PlanningOptions
{
    public const string Section = "Planning";

    /// <summary>
    /// Solver iterations per limited plan. Unset: max(50, 2 × the model's limit rows). When a plan runs out, the answer
    /// is the best point found, moved onto every hard input and rate limit, with status "iteration-limit" and its
    /// warning — so one hard request never holds a core for long.
    /// </summary>
    [Range(1, 1_000_000)]
    public int? MaxSolverIterations { get; set; }
}
