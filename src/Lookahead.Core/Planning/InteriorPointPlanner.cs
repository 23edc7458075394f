using System.Buffers;

namespace Lookahead.Core.Planning;

/// <summary>
/// A limited plan by <see cref="InteriorPointProblem"/> with the same rules around the solve as the active-set path
/// (<see cref="ConstrainedProblem.Solve"/>), so either can answer a plan:
/// <list type="bullet">
/// <item>a first move that cannot reach its input window within one rate step drops the k = 0 rate rows and makes
/// the plan <see cref="PlanStatus.Infeasible"/>, naming each such input;</item>
/// <item>with no fixed ρ, ρ starts at the automatic weight and is raised ×1000 (at most twice) while that shrinks the
/// largest slack below 99 % of what it was; otherwise the plan at the accepted weight is kept. A raise that the hard
/// limits alone show cannot succeed (<see cref="ForcedViolationBound"/>) is not solved;</item>
/// <item>inputs are put back onto their windows exactly, and a solve that stops early is reported with its count.</item>
/// </list>
/// </summary>
internal static class InteriorPointPlanner
{
    /// <summary>Solves a plan; <paramref name="inputs"/> receives u_0 … u_{N−1}.</summary>
    /// <param name="linearWeight">A fixed ρ for every soft output, or null for the automatic schedule.</param>
    public static ConstrainedOutcome Solve(
        InteriorPointProblem problem,
        Span<double> inputs,
        ReadOnlySpan<double> x0,
        ReadOnlySpan<double> previousInput,
        ReadOnlySpan<double> reference,
        ReadOnlySpan<double> targetState,
        ReadOnlySpan<double> targetInput,
        double? linearWeight)
    {
        int ns = problem.SlackCount;
        int nm = inputs.Length;
        bool hasPrevious = !previousInput.IsEmpty;
        var warnings = new List<Warning>();
        for (int i = 0; hasPrevious && i < problem.InputCount; i++)
        {
            if (problem.IsFirstMoveUnreachable(previousInput, i))
            {
                warnings.Add(new Warning(WarningCode.FirstMoveRateRelaxed) { Input = i, Step = 0 });
            }
        }

        bool dropped = warnings.Count > 0;
        var rented = ArrayPool<double>.Shared.Rent((3 * ns) + nm);
        var workspace = problem.Rent();
        try
        {
            var rho = rented.AsSpan(0, ns);
            var slacks = rented.AsSpan(ns, ns);
            var trialSlacks = rented.AsSpan(2 * ns, ns);
            var trialInputs = rented.AsSpan(3 * ns, nm);
            double weight = linearWeight ?? problem.AutomaticLinearWeight(hasPrevious);
            rho.Fill(weight);
            var result = problem.Solve(workspace, x0, previousInput, reference, targetState, targetInput, rho, inputs, slacks);
            int iterations = result.Iterations;
            var active = new List<ActiveLimit>();
            problem.ActiveLimits(workspace, hasPrevious && !dropped, active);
            if (linearWeight is null && result.Status == InteriorPointStatus.Optimal)
            {
                for (int raise = 0; raise < 2 && Max(slacks) > 1e-9; raise++)
                {
                    double before = Max(slacks);
                    if (problem.ForcedViolation(x0, previousInput, hasPrevious && !dropped) >= 0.99 * before * (1 + 1e-9))
                    {
                        // No plan within the hard limits has a largest slack below 99 % of this one, so the raise
                        // would be refused whatever its solve returned: skip it.
                        break;
                    }

                    rho.Fill(weight * 1e3);
                    var retry = problem.Solve(workspace, x0, previousInput, reference, targetState, targetInput, rho, trialInputs, trialSlacks);
                    iterations += retry.Iterations;
                    if (retry.Status != InteriorPointStatus.Optimal || Max(trialSlacks) >= 0.99 * before)
                    {
                        // Not worth it: the plan already in hand is the one at the accepted weight.
                        break;
                    }

                    weight *= 1e3;
                    result = retry;
                    trialInputs.CopyTo(inputs);
                    trialSlacks.CopyTo(slacks);
                    active.Clear();
                    problem.ActiveLimits(workspace, hasPrevious && !dropped, active);
                }
            }

            problem.ClipToInputLimits(inputs);
            var status = dropped ? PlanStatus.Infeasible : PlanStatus.Optimal;
            if (result.Status != InteriorPointStatus.Optimal)
            {
                // Stopped early (cap reached, stalled, or a Newton system that would not factor): the point is interior
                // to the hard limits up to rounding, already clipped, but not optimal.
                status = dropped ? status : PlanStatus.IterationLimit;
                warnings.Add(new Warning(WarningCode.IterationLimit) { Count = result.Status == InteriorPointStatus.IterationLimit ? problem.MaxIterations : result.Iterations });
            }

            double penalty = 0;
            var weights = problem.SlackWeights;
            for (int t = 0; t < ns; t++)
            {
                penalty += (weight * slacks[t]) + (weights[t] * slacks[t] * slacks[t]);
            }

            active.Sort((l, r) => l.Step != r.Step ? l.Step.CompareTo(r.Step) : l.Kind != r.Kind ? l.Kind.CompareTo(r.Kind) : l.Index.CompareTo(r.Index));
            return new ConstrainedOutcome(status, iterations, active, penalty, warnings);
        }
        finally
        {
            problem.Return(workspace);
            ArrayPool<double>.Shared.Return(rented);
        }
    }

    private static double Max(ReadOnlySpan<double> values)
    {
        double worst = 0;
        foreach (double v in values)
        {
            worst = Math.Max(worst, v);
        }

        return worst;
    }
}
