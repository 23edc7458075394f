using System.Collections.Concurrent;
using Lookahead.Core.Numerics;
using Lookahead.Core.Optimization;
using Lookahead.Core.Validation;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// The limits of one problem variant as a fixed set of inequality rows over z = [U; ε], ε ≥ 0 one slack per
/// output that has a soft limit (shared over the horizon). Only the right-hand sides depend on the request:
/// <list type="bullet">
/// <item>u_{k,i} ≥ umin_i, −u_{k,i} ≥ −umax_i;</item>
/// <item>Δu_{k,i} ≥ dmin_i, −Δu_{k,i} ≥ −dmax_i (k = 0 rows use u_{−1}; without one they are switched off);</item>
/// <item>y_{k,j} + ε_j ≥ ymin_j and −y_{k,j} + ε_j ≥ −ymax_j for k = 1 … N, with y_k = C(A^k x_0 + Σ_{i&lt;k} A^{k−1−i}B u_i);</item>
/// <item>ε_j ≥ 0.</item>
/// </list>
/// The soft penalty adds Σ_j (ρ_j ε_j + w_j ε_j²) to J. An ℓ₁-type penalty is exact once ρ_j exceeds the sum of the
/// multipliers of output j's rows (Fletcher's exact penalty theorem), so a plan that can respect the output
/// limits does.
/// </summary>
internal sealed class ConstrainedProblem
{
    /// <summary>Largest number of stored output-row coefficients (N²·outputs·m/2); keeps memory bounded.</summary>
    public const long MaxOutputRowEntries = 10_000_000;

    private readonly int n;
    private readonly int m;
    private readonly int horizon;
    private readonly ValidatedLimits limits;
    private readonly int[] slackOutputs;
    private readonly double[] outputFree; // rows (k−1)·ns + s of C A^k, row-major, n columns
    private readonly LimitRow[] rows;
    private readonly double[] constantRhs;
    private readonly ConcurrentBag<QpWorkspace> pool = new();

    public ConstrainedProblem(ValidatedModel model, Matrix<double> a, Matrix<double> b, GainSet gains)
    {
        n = model.StateCount;
        m = model.InputCount;
        horizon = model.Horizon;
        limits = model.Limits;
        var c = model.C;
        slackOutputs = Enumerable.Range(0, model.OutputCount).Where(j => double.IsFinite(limits.OutputMin[j]) || double.IsFinite(limits.OutputMax[j])).ToArray();
        int ns = slackOutputs.Length;
        int variables = (horizon * m) + ns;
        SlackWeights = slackOutputs.Select(j => limits.OutputViolationWeight[j]).ToArray();

        var rowList = new List<IReadOnlyList<(int, double)>>();
        var meaning = new List<LimitRow>();
        var rhs = new List<double>();
        void Add(IReadOnlyList<(int, double)> row, LimitRow what, double value)
        {
            rowList.Add(row);
            meaning.Add(what);
            rhs.Add(value);
        }

        for (int k = 0; k < horizon; k++)
        {
            for (int i = 0; i < m; i++)
            {
                int v = (k * m) + i;
                if (double.IsFinite(limits.InputMin[i]))
                {
                    Add([(v, 1.0)], new(LimitKind.InputMin, k, i), limits.InputMin[i]);
                }

                if (double.IsFinite(limits.InputMax[i]))
                {
                    Add([(v, -1.0)], new(LimitKind.InputMax, k, i), -limits.InputMax[i]);
                }
            }
        }

        for (int k = 0; k < horizon; k++)
        {
            for (int i = 0; i < m; i++)
            {
                int v = (k * m) + i;
                (int, double)[] up = k == 0 ? [(v, 1.0)] : [(v, 1.0), (v - m, -1.0)];
                (int, double)[] down = k == 0 ? [(v, -1.0)] : [(v, -1.0), (v - m, 1.0)];
                if (double.IsFinite(limits.InputRateMin[i]))
                {
                    Add(up, new(LimitKind.InputRateMin, k, i), limits.InputRateMin[i]);
                }

                if (double.IsFinite(limits.InputRateMax[i]))
                {
                    Add(down, new(LimitKind.InputRateMax, k, i), -limits.InputRateMax[i]);
                }
            }
        }

        // Output rows: y_k's dependence on u_i is C A^{k−1−i} B.
        outputFree = new double[horizon * ns * n];
        if (ns > 0)
        {
            var cPowers = new Matrix<double>[horizon]; // C A^d B, d = 0 … N−1
            var cA = c.Clone();
            for (int d = 0; d < horizon; d++)
            {
                cPowers[d] = cA * b;
                cA = cA * a;
            }

            var cAk = c * a;
            for (int k = 1; k <= horizon; k++)
            {
                for (int s = 0; s < ns; s++)
                {
                    int j = slackOutputs[s];
                    for (int col = 0; col < n; col++)
                    {
                        outputFree[((((k - 1) * ns) + s) * n) + col] = cAk[j, col];
                    }

                    var coefficients = new List<(int, double)>(k * m + 1);
                    for (int i = 0; i < k; i++)
                    {
                        var block = cPowers[k - 1 - i];
                        for (int col = 0; col < m; col++)
                        {
                            coefficients.Add(((i * m) + col, block[j, col]));
                        }
                    }

                    if (double.IsFinite(limits.OutputMin[j]))
                    {
                        Add([.. coefficients, ((horizon * m) + s, 1.0)], new(LimitKind.OutputMin, k, j), limits.OutputMin[j]);
                    }

                    if (double.IsFinite(limits.OutputMax[j]))
                    {
                        Add([.. coefficients.Select(e => (e.Item1, -e.Item2)), ((horizon * m) + s, 1.0)], new(LimitKind.OutputMax, k, j), -limits.OutputMax[j]);
                    }
                }

                cAk = cAk * a;
            }

            for (int s = 0; s < ns; s++)
            {
                Add([((horizon * m) + s, 1.0)], new(LimitKind.OutputMax, 0, slackOutputs[s], IsSlackBound: true), 0.0);
            }
        }

        AutomaticLinearWeight = 1e4 * Math.Max(1.0, Enumerable.Range(0, gains.Hessian.RowCount).Max(i => gains.Hessian[i, i]));
        rows = [.. meaning];
        constantRhs = [.. rhs];
        var factor = ns > 0 ? gains.Factor.WithDiagonalBlock(SlackWeights) : gains.Factor;
        Solver = new DualActiveSetSolver(factor, new SparseRows(variables, rowList), 0);
    }

    public DualActiveSetSolver Solver { get; }

    public int SlackCount => slackOutputs.Length;

    public double[] SlackWeights { get; }

    public int RowCount => rows.Length;

    public long Bytes => (sizeof(double) * ((long)Solver.Variables * Solver.Variables)) + (12L * Solver.Constraints.NonZeroCount) + (8L * outputFree.Length);

    /// <summary>Stored coefficients the output rows would need; checked before building.</summary>
    public static long OutputRowEntries(ValidatedModel model)
    {
        long bounded = Enumerable.Range(0, model.OutputCount).Count(j => double.IsFinite(model.Limits.OutputMin[j]) || double.IsFinite(model.Limits.OutputMax[j]));
        return bounded * model.Horizon * (model.Horizon + 1) / 2 * model.InputCount * 2;
    }

    public LimitRow Row(int index) => rows[index];

    public QpWorkspace Rent() => pool.TryTake(out var workspace) ? workspace : Solver.CreateWorkspace();

    public void Return(QpWorkspace workspace) => pool.Add(workspace);

    /// <summary>Right-hand sides for this request; k = 0 rate rows are switched off without a previous input or when told to.</summary>
    public void RightHandSides(ReadOnlySpan<double> x0, ReadOnlySpan<double> previousInput, bool dropFirstRateRows, Span<double> rhs)
    {
        constantRhs.CopyTo(rhs);
        int ns = slackOutputs.Length;
        for (int row = 0; row < rows.Length; row++)
        {
            var what = rows[row];
            switch (what.Kind)
            {
                case LimitKind.InputRateMin when what.Step == 0:
                    rhs[row] = previousInput.IsEmpty || dropFirstRateRows ? double.NegativeInfinity : rhs[row] + previousInput[what.Index];
                    break;
                case LimitKind.InputRateMax when what.Step == 0:
                    rhs[row] = previousInput.IsEmpty || dropFirstRateRows ? double.NegativeInfinity : rhs[row] - previousInput[what.Index];
                    break;
                case LimitKind.OutputMin when !what.IsSlackBound:
                    rhs[row] -= FreeResponse(what.Step, what.Index, x0, ns);
                    break;
                case LimitKind.OutputMax when !what.IsSlackBound:
                    rhs[row] += FreeResponse(what.Step, what.Index, x0, ns);
                    break;
            }
        }
    }

    /// <summary>The inputs that cannot satisfy both the input window and the first rate limit from u_{−1}.</summary>
    public IEnumerable<int> UnreachableFirstMoves(ReadOnlySpan<double> previousInput)
    {
        var result = new List<int>();
        if (previousInput.IsEmpty)
        {
            return result;
        }

        for (int i = 0; i < m; i++)
        {
            double low = Math.Max(limits.InputMin[i], previousInput[i] + limits.InputRateMin[i]);
            double high = Math.Min(limits.InputMax[i], previousInput[i] + limits.InputRateMax[i]);
            if (low > high + (DualActiveSetSolver.FeasibilityTolerance * (1 + Math.Abs(high))))
            {
                result.Add(i);
            }
        }

        return result;
    }

    public void ClipToInputLimits(Span<double> inputs)
    {
        for (int k = 0; k < horizon; k++)
        {
            for (int i = 0; i < m; i++)
            {
                ref double v = ref inputs[(k * m) + i];
                v = Math.Clamp(v, limits.InputMin[i], limits.InputMax[i]);
            }
        }
    }

    /// <summary>Largest amount by which y_1 … y_N exceed the soft output limits, and where (output −1 when none does).</summary>
    public (double Amount, int Output, int Step) WorstViolation(ReadOnlySpan<double> outputs, int p)
    {
        (double Amount, int Output, int Step) worst = (0, -1, 0);
        for (int k = 1; k <= horizon; k++)
        {
            foreach (int j in slackOutputs)
            {
                double y = outputs[(k * p) + j];
                double excess = Math.Max(limits.OutputMin[j] - y, y - limits.OutputMax[j]);
                if (excess > worst.Amount)
                {
                    worst = (excess, j, k);
                }
            }
        }

        return worst;
    }

    /// <summary>
    /// Solves the limited plan in place: <paramref name="inputs"/> holds the unconstrained optimum on entry and the
    /// constrained one on return. With <paramref name="linearWeight"/> null the linear soft-limit weight starts at
    /// <see cref="AutomaticLinearWeight"/> and is raised ×1000 (at most twice) while that still shrinks a violation,
    /// so a violation that remains is one the hard limits force.
    /// </summary>
    public ConstrainedOutcome Solve(Span<double> inputs, ReadOnlySpan<double> x0, ReadOnlySpan<double> previousInput, double? linearWeight, int maxIterations)
    {
        int nm = horizon * m;
        int ns = slackOutputs.Length;
        var warnings = new List<Warning>();
        var unreachable = UnreachableFirstMoves(previousInput).ToList();
        bool dropFirstRate = unreachable.Count > 0;
        var workspace = Rent();
        var rhs = System.Buffers.ArrayPool<double>.Shared.Rent(rows.Length);
        var start = System.Buffers.ArrayPool<double>.Shared.Rent(nm + ns);
        var x = System.Buffers.ArrayPool<double>.Shared.Rent(nm + ns);
        try
        {
            var rhsSpan = rhs.AsSpan(0, rows.Length);
            var xSpan = x.AsSpan(0, nm + ns);
            var startSpan = start.AsSpan(0, nm + ns);
            RightHandSides(x0, previousInput, dropFirstRate, rhsSpan);
            inputs.CopyTo(startSpan);
            double rho = linearWeight ?? AutomaticLinearWeight;
            QpResult result = SolveWith(rho, startSpan, rhsSpan, xSpan, maxIterations, workspace);
            double penalty = Penalty(xSpan[nm..], rho);
            int totalIterations = result.Iterations;
            if (linearWeight is null && result.Status == QpStatus.Optimal)
            {
                for (int raise = 0; raise < 2 && MaxSlack(xSpan[nm..]) > 1e-9; raise++)
                {
                    double before = MaxSlack(xSpan[nm..]);
                    var retry = SolveWith(rho * 1e3, startSpan, rhsSpan, xSpan, maxIterations, workspace);
                    totalIterations += retry.Iterations;
                    if (retry.Status == QpStatus.Optimal && MaxSlack(xSpan[nm..]) < 0.99 * before)
                    {
                        rho *= 1e3;
                        result = retry;
                        penalty = Penalty(xSpan[nm..], rho);
                    }
                    else
                    {
                        // Not worth it: solve again at the accepted weight so solution and active set agree.
                        result = SolveWith(rho, startSpan, rhsSpan, xSpan, maxIterations, workspace);
                        break;
                    }
                }
            }

            xSpan[..nm].CopyTo(inputs);

            // The solver meets limits to its feasibility tolerance; a receiving system checks them exactly, so an
            // input a rounding error outside its window (−1e−17 for a fan whose minimum is 0) is put back on it.
            ClipToInputLimits(inputs);
            var status = PlanStatus.Optimal;
            if (dropFirstRate)
            {
                status = PlanStatus.Infeasible;
                foreach (int input in unreachable)
                {
                    warnings.Add(new Warning(WarningCode.FirstMoveRateRelaxed) { Input = input, Step = 0 });
                }
            }

            if (result.Status == QpStatus.IterationLimit)
            {
                status = status == PlanStatus.Infeasible ? status : PlanStatus.IterationLimit;
                ClipToInputLimits(inputs);
                warnings.Add(new Warning(WarningCode.IterationLimit) { Count = maxIterations });
            }
            else if (result.Status == QpStatus.Infeasible)
            {
                status = PlanStatus.Infeasible;
                ClipToInputLimits(inputs);
                var blocking = result.BlockingConstraint >= 0 ? rows[result.BlockingConstraint] : default;
                warnings.Add(result.BlockingConstraint >= 0
                    ? new Warning(WarningCode.LimitsContradict) { Limit = blocking.Kind, Step = blocking.Step, Input = blocking.Kind is LimitKind.OutputMin or LimitKind.OutputMax ? null : blocking.Index, Output = blocking.Kind is LimitKind.OutputMin or LimitKind.OutputMax ? blocking.Index : null }
                    : new Warning(WarningCode.LimitsContradict));
            }

            var active = new List<ActiveLimit>();
            foreach (int row in workspace.ActiveConstraints(result.ActiveCount))
            {
                var what = rows[row];
                if (!what.IsSlackBound)
                {
                    active.Add(new ActiveLimit(what.Kind, what.Step, what.Index));
                }
            }

            active.Sort((l, r) => l.Step != r.Step ? l.Step.CompareTo(r.Step) : l.Kind != r.Kind ? l.Kind.CompareTo(r.Kind) : l.Index.CompareTo(r.Index));
            return new ConstrainedOutcome(status, totalIterations, active, penalty, warnings);
        }
        finally
        {
            System.Buffers.ArrayPool<double>.Shared.Return(rhs);
            System.Buffers.ArrayPool<double>.Shared.Return(start);
            System.Buffers.ArrayPool<double>.Shared.Return(x);
            Return(workspace);
        }
    }

    /// <summary>Automatic linear soft-limit weight: 10⁴ × the largest Hessian diagonal entry (at least 10⁴).</summary>
    public double AutomaticLinearWeight { get; }

    private QpResult SolveWith(double rho, ReadOnlySpan<double> start, ReadOnlySpan<double> rhs, Span<double> x, int maxIterations, QpWorkspace workspace)
    {
        int nm = horizon * m;
        start[..nm].CopyTo(x);
        for (int s = 0; s < slackOutputs.Length; s++)
        {
            // Unconstrained minimiser of ½wε² + (ρ/2)ε.
            x[nm + s] = -rho / (2 * SlackWeights[s]);
        }

        return Solver.Solve(default, rhs, x, unconstrained: true, maxIterations, workspace);
    }

    private double Penalty(ReadOnlySpan<double> slack, double rho)
    {
        double sum = 0;
        for (int s = 0; s < slack.Length; s++)
        {
            sum += (rho * slack[s]) + (SlackWeights[s] * slack[s] * slack[s]);
        }

        return sum;
    }

    private static double MaxSlack(ReadOnlySpan<double> slack)
    {
        double worst = 0;
        foreach (double v in slack)
        {
            worst = Math.Max(worst, v);
        }

        return worst;
    }

    private double FreeResponse(int step, int output, ReadOnlySpan<double> x0, int ns)
    {
        int s = Array.IndexOf(slackOutputs, output);
        return DenseKernels.Dot(outputFree.AsSpan((((step - 1) * ns) + s) * n, n), x0);
    }
}
