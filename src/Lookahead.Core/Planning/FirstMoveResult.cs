namespace Lookahead.Core.Planning;

/// <summary>The first move's status and the plan's optimal cost J (without any soft-limit penalty); the move itself is in the caller's span.</summary>
/// <param name="Warnings">Anything that is not a clean optimum (empty when there is nothing to say).</param>
public readonly record struct FirstMoveResult(PlanStatus Status, double Cost, IReadOnlyList<Warning> Warnings);
