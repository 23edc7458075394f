namespace Lookahead.Core.Planning;

/// <summary>What the limited solve reports back to the plan.</summary>
/// <param name="Penalty">Σ_j (ρ_j ε_j + w_j ε_j²) at the solution.</param>
internal sealed record ConstrainedOutcome(PlanStatus Status, int Iterations, IReadOnlyList<ActiveLimit> ActiveLimits, double Penalty, IReadOnlyList<Warning> Warnings);
