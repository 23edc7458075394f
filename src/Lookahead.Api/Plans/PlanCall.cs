using Lookahead.Api.Http;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Plans;

/// <summary>
/// One plan request and its answer, in buffers sized for one model: a parser fills the vectors (or the errors),
/// <see cref="PlanRunner"/> fills the outcome. /plan uses one per request; replay recycles one per row slot.
/// </summary>
public class PlanCall
{
    public PlanCall(int n, int m, int p)
    {
        State = new double[n];
        Reference = new double[p];
        PreviousInput = new double[m];
        FirstMove = new double[m];
    }

    public double[] State { get; }

    public double[] Reference { get; }

    public double[] PreviousInput { get; }

    public bool HasReference { get; set; }

    public bool HasPreviousInput { get; set; }

    /// <summary>Field errors from parsing or from the core's check of the request; empty when it was planned.</summary>
    public List<ProblemError> Errors { get; } = [];

    /// <summary>Where the text stopped being JSON, when it did (line and position, 1-based); null otherwise.</summary>
    public (long Line, long Position)? SyntaxErrorAt { get; set; }

    /// <summary>The full plan, when the caller asked for every field.</summary>
    public Plan? Plan { get; set; }

    /// <summary>u_0 of a planned request (filled at every depth).</summary>
    public double[] FirstMove { get; }

    /// <summary>Status, cost and warnings of a planned request; null when it failed.</summary>
    public FirstMoveResult? Outcome { get; set; }

    public double SolveMicroseconds { get; set; }

    public void AddError(string path, string reason) => Errors.Add(new ProblemError(path, reason));

    /// <summary>The core's request over this call's buffers (no copies).</summary>
    public PlanRequest ToRequest() => new(State, HasReference ? Reference : null, HasPreviousInput ? PreviousInput : null);

    protected void ResetCall()
    {
        HasReference = false;
        HasPreviousInput = false;
        Errors.Clear();
        SyntaxErrorAt = null;
        Plan = null;
        Outcome = null;
        SolveMicroseconds = 0;
    }
}
