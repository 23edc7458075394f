using Lookahead.Api.Http;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Plans;

/// <summary>
/// One plan request and its answer, in buffers sized for one model: a parser fills the vectors (or the errors),
/// <see cref="PlanRunner"/> fills the outcome. /plan uses one per request; replay recycles one per row slot.
/// </summary>
public class PlanCall
{
    /// <param name="n">States.</param>
    /// <param name="m">Inputs.</param>
    /// <param name="p">Outputs.</param>
    /// <param name="q">Measured disturbances (0: the model takes none).</param>
    /// <param name="horizon">N, the most rows a schedule or forecast may have.</param>
    /// <param name="estimatedDisturbances">n_d of the model's estimator (0: it has none, and a plan cannot take an estimate).</param>
    public PlanCall(int n, int m, int p, int q = 0, int horizon = 1, int estimatedDisturbances = 0)
    {
        DisturbanceEstimate = new double[estimatedDisturbances];
        AcceptsEstimate = estimatedDisturbances > 0;
        State = new double[n];
        Reference = new double[p];
        PreviousInput = new double[m];
        FirstMove = new double[m];
        DisturbanceCount = q;
        Horizon = horizon;
    }

    public int DisturbanceCount { get; }

    /// <summary>d̂ of an "estimate" given instead of a measured state (its x̂ is in <see cref="State"/>).</summary>
    public double[] DisturbanceEstimate { get; }

    public bool HasDisturbanceEstimate { get; set; }

    /// <summary>Whether the model has an estimator, so that a plan may start from its estimate.</summary>
    public bool AcceptsEstimate { get; }

    public int Horizon { get; }

    /// <summary>Rows of a reference schedule (made on first use, N rows of p); the first <see cref="ReferenceRowCount"/> are this call's.</summary>
    public double[][] ReferenceRows => referenceRows ??= Rows(Horizon, Reference.Length);

    /// <summary>Rows of a disturbance forecast (made on first use, N rows of q); the first <see cref="DisturbanceRowCount"/> are this call's.</summary>
    public double[][] DisturbanceRows => disturbanceRows ??= Rows(Horizon, DisturbanceCount);

    /// <summary>Rows of the schedule given (0: none, or a single setpoint in <see cref="Reference"/>).</summary>
    public int ReferenceRowCount { get; set; }

    /// <summary>Rows of the disturbance given (0: none; a single vector is one row).</summary>
    public int DisturbanceRowCount { get; set; }

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
    public PlanRequest ToRequest() => new(
        State,
        HasReference ? Reference : null,
        HasPreviousInput ? PreviousInput : null,
        ReferenceRowCount > 0 ? ReferenceRows[..ReferenceRowCount] : null,
        DisturbanceRowCount > 0 ? DisturbanceRows[..DisturbanceRowCount] : null,
        HasDisturbanceEstimate ? DisturbanceEstimate : null);

    private double[][]? referenceRows;
    private double[][]? disturbanceRows;

    private static double[][] Rows(int count, int width) => Enumerable.Range(0, count).Select(_ => new double[width]).ToArray();

    protected void ResetCall()
    {
        HasReference = false;
        HasPreviousInput = false;
        ReferenceRowCount = 0;
        DisturbanceRowCount = 0;
        HasDisturbanceEstimate = false;
        Errors.Clear();
        SyntaxErrorAt = null;
        Plan = null;
        Outcome = null;
        SolveMicroseconds = 0;
    }
}
