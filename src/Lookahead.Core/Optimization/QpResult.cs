namespace Lookahead.Core.Optimization;

/// <summary>Outcome of one solve. The solution itself is written into the caller's span.</summary>
/// <param name="Status">How the solve ended.</param>
/// <param name="Iterations">Constraints added or dropped.</param>
/// <param name="ActiveCount">Constraints in the final active set.</param>
/// <param name="BlockingConstraint">For <see cref="QpStatus.Infeasible"/>, the constraint that could not be satisfied; otherwise −1.</param>
public readonly record struct QpResult(QpStatus Status, int Iterations, int ActiveCount, int BlockingConstraint);
