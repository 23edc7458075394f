namespace Lookahead.Core.Planning;

/// <summary>How a solve of <see cref="InteriorPointProblem"/> ended.</summary>
internal enum InteriorPointStatus
{
    /// <summary>Primal and dual residuals and every row's complementarity are below their tolerances, or a polished active set passed the KKT check.</summary>
    Optimal,

    /// <summary><see cref="InteriorPointProblem.MaxIterations"/> was reached first; the point is interior but not optimal.</summary>
    IterationLimit,

    /// <summary>The gap stopped shrinking short of the tolerances (rounding limits this problem's accuracy).</summary>
    Stalled,

    /// <summary>A Newton system could not be factored or produced non-finite numbers (overflowing data).</summary>
    NumericalFailure,
}
