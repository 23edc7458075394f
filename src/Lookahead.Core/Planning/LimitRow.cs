namespace Lookahead.Core.Planning;

/// <summary>What one inequality row of the constrained plan stands for.</summary>
/// <param name="Kind">The limit.</param>
/// <param name="Step">k of u_k, Δu_k or y_k.</param>
/// <param name="Index">Which input or output.</param>
/// <param name="IsSlackBound">True for the row ε_j ≥ 0 (not a limit of its own).</param>
internal readonly record struct LimitRow(LimitKind Kind, int Step, int Index, bool IsSlackBound = false);
