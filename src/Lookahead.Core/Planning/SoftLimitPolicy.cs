using Lookahead.Core.Optimization;
using Lookahead.Core.Validation;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// How soft output limits are priced, solved and reported. Each output with a limit gets one slack ε_j ≥ 0 shared
/// over the horizon, and the objective gains the penalty Σ_j (ρ ε_j + w_j ε_j²), w_j the model's output violation
/// weight. The linear part makes the penalty exact: once ρ exceeds the sum of the multipliers of output j's rows,
/// any plan that can respect the limits does (Fletcher's exact penalty theorem). ρ starts at
/// <see cref="AutomaticLinearWeight"/>; while a plan still violates a soft limit it is raised ×<see cref="RaiseFactor"/>
/// (at most <see cref="MaxRaises"/> times) and kept only if the violation shrank — so a violation that remains is one
/// the hard limits force, and the plan carries a <see cref="WarningCode.SoftOutputLimitExceeded"/> warning.
/// </summary>
internal sealed class SoftLimitPolicy
{
    /// <summary>ρ per unit of the largest Hessian diagonal entry: far above any multiplier a well-scaled plan produces.</summary>
    public const double AutomaticWeightPerHessianScale = 1e4;

    /// <summary>Each raise multiplies ρ by this: large enough that two raises cover ill-scaled plants, small enough to stay well conditioned.</summary>
    public const double RaiseFactor = 1e3;

    /// <summary>Raises tried per plan; each costs one more solve.</summary>
    public const int MaxRaises = 2;

    /// <summary>A slack at or below this is rounding, not a violation worth a raise.</summary>
    public const double NegligibleSlack = 1e-9;

    /// <summary>A raise is kept only when it leaves at most this fraction of the slack: less is noise, not progress.</summary>
    public const double WorthwhileShrink = 0.99;

    /// <summary>An output excess above this is reported as a warning; below it is the solver's rounding.</summary>
    public const double ReportedViolation = 1e-9;

    /// <summary>The request's parts the forced-violation bound reads, and the bound (null without one).</summary>
    public readonly ref struct Request(ReadOnlySpan<double> state, ReadOnlySpan<double> previousInput, IReadOnlyList<int> relaxed, ForcedViolationBound? bound)
    {
        public ReadOnlySpan<double> State { get; } = state;

        public ReadOnlySpan<double> PreviousInput { get; } = previousInput;

        public IReadOnlyList<int> Relaxed { get; } = relaxed;

        public ForcedViolationBound? Bound { get; } = bound;
    }

    private readonly ValidatedLimits limits;
    private readonly int horizon;

    public SoftLimitPolicy(ValidatedModel model, Matrix<double> hessian)
    {
        limits = model.Limits;
        horizon = model.Horizon;
        Outputs = Enumerable.Range(0, model.OutputCount).Where(j => double.IsFinite(limits.OutputMin[j]) || double.IsFinite(limits.OutputMax[j])).ToArray();
        Weights = Outputs.Select(j => limits.OutputViolationWeight[j]).ToArray();
        AutomaticLinearWeight = AutomaticWeightPerHessianScale * Math.Max(1.0, Enumerable.Range(0, hessian.RowCount).Max(i => hessian[i, i]));
    }

    /// <summary>The outputs with a soft limit, in slack order.</summary>
    public int[] Outputs { get; }

    /// <summary>w_j of each slack, in slack order.</summary>
    public double[] Weights { get; }

    public int Count => Outputs.Length;

    /// <summary>ρ chosen from the Hessian: <see cref="AutomaticWeightPerHessianScale"/> × max(1, max_i H_ii).</summary>
    public double AutomaticLinearWeight { get; }

    /// <summary>
    /// Solves the limited program from the unconstrained inputs in <paramref name="start"/>[..N·m]; <paramref name="x"/>
    /// receives [U; ε]. With <paramref name="fixedWeight"/> null, ρ starts automatic and is raised as the class
    /// summary says; otherwise ρ is that weight.
    /// </summary>
    /// <returns>The accepted solve, the iterations of every solve that counted, and the penalty at the solution.</returns>
    /// <param name="warmStart">Start the first solve from the workspace's last active set; later solves of the same plan always do.</param>
    /// <param name="request">What the forced-violation bound needs; the bound is computed only when a raise is
    /// considered, and a raise that could not shrink the slack enough is not tried.</param>
    public (QpResult Result, int Iterations, double Penalty) Solve(DualActiveSetSolver solver, ReadOnlySpan<double> start, ReadOnlySpan<double> rhs, Span<double> x, double? fixedWeight, int maxIterations, QpWorkspace workspace, Request request, bool warmStart = false)
    {
        int nm = x.Length - Count;
        double rho = fixedWeight ?? AutomaticLinearWeight;
        QpResult result = SolveAt(solver, rho, start, rhs, x, maxIterations, workspace, warmStart);
        double penalty = Penalty(x[nm..], rho);
        int iterations = result.Iterations;
        if (fixedWeight is null && result.Status == QpStatus.Optimal)
        {
            double forced = -1;
            for (int raise = 0; raise < MaxRaises && MaxSlack(x[nm..]) > NegligibleSlack; raise++)
            {
                double before = MaxSlack(x[nm..]);
                if (request.Bound is { } bound && (forced >= 0 ? forced : forced = bound.Compute(request.State, request.PreviousInput, request.Relaxed)) >= WorthwhileShrink * before)
                {
                    // No plan within the hard limits comes below this violation, so a raise would be refused anyway.
                    break;
                }

                // The same limits at a higher price: the active set just found is the natural start.
                var retry = SolveAt(solver, rho * RaiseFactor, start, rhs, x, maxIterations, workspace, warmStart: true);
                iterations += retry.Iterations;
                if (retry.Status == QpStatus.Optimal && MaxSlack(x[nm..]) < WorthwhileShrink * before)
                {
                    rho *= RaiseFactor;
                    result = retry;
                    penalty = Penalty(x[nm..], rho);
                }
                else
                {
                    // Not worth it: solve again at the accepted weight so solution and active set agree.
                    result = SolveAt(solver, rho, start, rhs, x, maxIterations, workspace, warmStart: true);
                    break;
                }
            }
        }

        return (result, iterations, penalty);
    }

    /// <summary>Largest excess of y_1 … y_N over the soft output limits (0 when none), and its warning when above <see cref="ReportedViolation"/>.</summary>
    /// <param name="outputs">y_0 … y_N, row-major (N+1)×p.</param>
    public (double Amount, Warning? Warning) Violation(ReadOnlySpan<double> outputs, int p)
    {
        (double Amount, int Output, int Step) worst = (0, -1, 0);
        for (int k = 1; k <= horizon; k++)
        {
            foreach (int j in Outputs)
            {
                double y = outputs[(k * p) + j];
                double excess = Math.Max(limits.OutputMin[j] - y, y - limits.OutputMax[j]);
                if (excess > worst.Amount)
                {
                    worst = (excess, j, k);
                }
            }
        }

        var warning = worst.Amount > ReportedViolation
            ? new Warning(WarningCode.SoftOutputLimitExceeded) { Output = worst.Output, Step = worst.Step, Amount = worst.Amount }
            : null;
        return (worst.Amount, warning);
    }

    /// <summary>Σ_j (ρ ε_j + w_j ε_j²).</summary>
    public double Penalty(ReadOnlySpan<double> slack, double rho)
    {
        double sum = 0;
        for (int s = 0; s < slack.Length; s++)
        {
            sum += (rho * slack[s]) + (Weights[s] * slack[s] * slack[s]);
        }

        return sum;
    }

    private QpResult SolveAt(DualActiveSetSolver solver, double rho, ReadOnlySpan<double> start, ReadOnlySpan<double> rhs, Span<double> x, int maxIterations, QpWorkspace workspace, bool warmStart)
    {
        int nm = x.Length - Count;
        start[..nm].CopyTo(x);
        for (int s = 0; s < Count; s++)
        {
            // Unconstrained minimiser of ½wε² + (ρ/2)ε (the solver's objective is half of J's).
            x[nm + s] = -rho / (2 * Weights[s]);
        }

        return solver.Solve(default, rhs, x, unconstrained: true, maxIterations, workspace, warmStart);
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
}
