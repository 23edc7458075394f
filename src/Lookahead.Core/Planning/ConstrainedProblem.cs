using System.Buffers;
using System.Collections.Concurrent;
using Lookahead.Core.Optimization;
using Lookahead.Core.Validation;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// One limited solve of a problem variant (with or without the Δu_0 term): the request's right-hand sides from
/// <see cref="LimitRows"/>, the solve under the <see cref="SoftLimitPolicy"/> by the dual active-set method from the
/// unconstrained optimum, and the plan's status, warnings and active limits from the result. The rows, the
/// solver and its cached J₀ are built once; workspaces are pooled so concurrent plans never share one.
/// </summary>
internal sealed class ConstrainedProblem
{
    /// <inheritdoc cref="LimitRows.MaxOutputRowEntries"/>
    public const long MaxOutputRowEntries = LimitRows.MaxOutputRowEntries;

    private readonly int decisionVariables;
    private readonly ConcurrentBag<QpWorkspace> pool = new();

    /// <summary>Each row's place when the active limits are reported by step, then kind, then index; and its inverse.</summary>
    private readonly int[] reportRank;
    private readonly int[] rowAtRank;

    public ConstrainedProblem(ValidatedModel model, Matrix<double> a, Matrix<double> b, GainSet gains)
    {
        decisionVariables = model.Horizon * model.InputCount;
        SoftLimits = new SoftLimitPolicy(model, gains.Hessian);
        Rows = new LimitRows(model, a, b, SoftLimits.Outputs);
        var factor = SoftLimits.Count > 0 ? gains.Factor.WithDiagonalBlock(SoftLimits.Weights) : gains.Factor;
        if (SoftLimits.Count > 0)
        {
            var limits = model.Limits;
            var soft = SoftLimits.Outputs;
            var cs = new double[soft.Length * model.StateCount];
            for (int t = 0; t < soft.Length; t++)
            {
                for (int i = 0; i < model.StateCount; i++)
                {
                    cs[(t * model.StateCount) + i] = model.C[soft[t], i];
                }
            }

            ForcedViolation = new ForcedViolationBound(a, b, cs, soft.Select(j => limits.OutputMin[j]).ToArray(), soft.Select(j => limits.OutputMax[j]).ToArray(), model.Horizon, limits.InputMin, limits.InputMax, limits.InputRateMin, limits.InputRateMax);
        }

        Solver = new DualActiveSetSolver(factor, Rows.Normals, 0, guessActiveSets: true, rangeSpace: true);
        rowAtRank = Enumerable.Range(0, Rows.Count)
            .OrderBy(j => Rows.Meaning(j).Step).ThenBy(j => Rows.Meaning(j).Kind).ThenBy(j => Rows.Meaning(j).Index)
            .ToArray();
        reportRank = new int[Rows.Count];
        for (int rank = 0; rank < rowAtRank.Length; rank++)
        {
            reportRank[rowAtRank[rank]] = rank;
        }
    }

    public LimitRows Rows { get; }

    public SoftLimitPolicy SoftLimits { get; }

    public DualActiveSetSolver Solver { get; }

    /// <summary>The least soft-limit violation the hard limits force (null without soft limits).</summary>
    public ForcedViolationBound? ForcedViolation { get; }

    public int RowCount => Rows.Count;

    /// <summary>Memory held: the solver's J₀ (a dense square over [U; ε]), its range-space S and W, and the rows.</summary>
    public long Bytes => (sizeof(double) * ((long)Solver.Variables * Solver.Variables)) + Solver.GuessBytes + Solver.RangeSpaceBytes + Rows.Bytes + (sizeof(int) * 2L * Rows.Count);

    /// <inheritdoc cref="LimitRows.OutputRowEntries"/>
    public static long OutputRowEntries(ValidatedModel model) => LimitRows.OutputRowEntries(model);

    /// <summary>
    /// Solves the limited plan in place: <paramref name="inputs"/> holds the unconstrained optimum on entry and the
    /// constrained one on return. <paramref name="linearWeight"/> fixes the soft-limit weight ρ; null lets the
    /// <see cref="SoftLimitPolicy"/> choose and raise it.
    /// </summary>
    /// <param name="warm">A workspace the caller keeps between solves of this variant: the solve starts from its last
    /// active set and leaves its own there. Null takes a pooled workspace and starts cold.</param>
    /// <param name="outputOffsets">C d_k of a measured disturbance ((N+1) rows of p), or empty (see <see cref="LimitRows.RightHandSides"/>).</param>
    /// <param name="coldStart">Start cold even with <paramref name="warm"/> (which still receives this solve's active set).</param>
    public ConstrainedOutcome Solve(Span<double> inputs, ReadOnlySpan<double> x0, ReadOnlySpan<double> previousInput, double? linearWeight, int maxIterations, QpWorkspace? warm = null, ReadOnlySpan<double> outputOffsets = default, bool coldStart = false)
    {
        int nm = decisionVariables;
        int variables = nm + SoftLimits.Count;
        var unreachable = Rows.UnreachableFirstMoves(previousInput);
        var workspace = warm ?? (pool.TryTake(out var pooled) ? pooled : Solver.CreateWorkspace());
        var rhs = ArrayPool<double>.Shared.Rent(Rows.Count);
        var start = ArrayPool<double>.Shared.Rent(variables);
        var x = ArrayPool<double>.Shared.Rent(variables);
        try
        {
            var rhsSpan = rhs.AsSpan(0, Rows.Count);
            var xSpan = x.AsSpan(0, variables);
            var startSpan = start.AsSpan(0, variables);
            // Only the inputs that cannot reach their window lose their first rate limit; the others keep theirs.
            Rows.RightHandSides(x0, previousInput, unreachable, rhsSpan, outputOffsets);
            inputs.CopyTo(startSpan);

            // The bound on forced violations rolls out x_0 alone; with a disturbance it does not apply.
            var request = new SoftLimitPolicy.Request(x0, previousInput, unreachable, outputOffsets.IsEmpty ? ForcedViolation : null);
            var (result, iterations, penalty) = SoftLimits.Solve(Solver, startSpan, rhsSpan, xSpan, linearWeight, maxIterations, workspace, request, warmStart: warm is not null && !coldStart);
            xSpan[..nm].CopyTo(inputs);

            // The solver meets limits to its feasibility tolerance; a receiving system checks them exactly, so an
            // input a rounding error outside its window (−1e−17 for a fan whose minimum is 0) is put back on it.
            Rows.ClipToInputLimits(inputs);
            if (result.Status == QpStatus.NotFinite)
            {
                // The request's numbers overflowed the solve: no inputs are an answer, and the model's overflow check
                // names the request's field instead.
                inputs.Fill(double.NaN);
            }
            else if (result.Status != QpStatus.Optimal)
            {
                // Stopped early or blocked: the best point found, moved onto every hard input and rate limit.
                Rows.ProjectOntoHardLimits(inputs, previousInput, unreachable);
            }

            var (status, warnings) = Report(result, unreachable, maxIterations);
            return new ConstrainedOutcome(status, iterations, ActiveLimits(workspace, result.ActiveCount), penalty, warnings);
        }
        finally
        {
            ArrayPool<double>.Shared.Return(rhs);
            ArrayPool<double>.Shared.Return(start);
            ArrayPool<double>.Shared.Return(x);
            if (warm is null)
            {
                pool.Add(workspace);
            }
        }
    }

    /// <summary>
    /// The plan's status and warnings: a relaxed first rate limit makes the plan infeasible (naming each input);
    /// an iteration cap or contradicting limits say so with the row that blocked. Inputs were clipped already.
    /// </summary>
    private (PlanStatus Status, List<Warning> Warnings) Report(QpResult result, IReadOnlyList<int> relaxedInputs, int maxIterations)
    {
        var warnings = new List<Warning>();
        var status = PlanStatus.Optimal;
        if (relaxedInputs.Count > 0)
        {
            status = PlanStatus.Infeasible;
            foreach (int input in relaxedInputs)
            {
                warnings.Add(new Warning(WarningCode.FirstMoveRateRelaxed) { Input = input, Step = 0 });
            }
        }

        if (result.Status == QpStatus.IterationLimit)
        {
            status = status == PlanStatus.Infeasible ? status : PlanStatus.IterationLimit;
            warnings.Add(new Warning(WarningCode.IterationLimit) { Count = maxIterations });
        }
        else if (result.Status == QpStatus.Infeasible)
        {
            status = PlanStatus.Infeasible;
            warnings.Add(Contradiction(result.BlockingConstraint));
        }

        return (status, warnings);
    }

    private Warning Contradiction(int blockingRow)
    {
        if (blockingRow < 0)
        {
            return new Warning(WarningCode.LimitsContradict);
        }

        var blocking = Rows.Meaning(blockingRow);
        bool onOutput = blocking.Kind is LimitKind.OutputMin or LimitKind.OutputMax;
        return new Warning(WarningCode.LimitsContradict)
        {
            Limit = blocking.Kind,
            Step = blocking.Step,
            Input = onOutput ? null : blocking.Index,
            Output = onOutput ? blocking.Index : null,
        };
    }

    /// <summary>The limits holding with equality, slack bounds left out, ordered by step, kind and index.</summary>
    private List<ActiveLimit> ActiveLimits(QpWorkspace workspace, int activeCount)
    {
        // Ranks in (step, kind, index) order were fixed with the rows: marking them in a bitmap and reading its set
        // bits in order sorts the plan's limits in O(rows/64 + active).
        int words = (rowAtRank.Length + 63) / 64;
        var marked = words <= 64 ? stackalloc ulong[words] : new ulong[words];
        marked.Clear();
        int count = 0;
        foreach (int row in workspace.ActiveConstraints(activeCount))
        {
            if (!Rows.Meaning(row).IsSlackBound)
            {
                int rank = reportRank[row];
                marked[rank >> 6] |= 1UL << (rank & 63);
                count++;
            }
        }

        var active = new List<ActiveLimit>(count);
        for (int w = 0; w < words; w++)
        {
            for (ulong bits = marked[w]; bits != 0; bits &= bits - 1)
            {
                var what = Rows.Meaning(rowAtRank[(w << 6) + System.Numerics.BitOperations.TrailingZeroCount(bits)]);
                active.Add(new ActiveLimit(what.Kind, what.Step, what.Index));
            }
        }

        return active;
    }
}
