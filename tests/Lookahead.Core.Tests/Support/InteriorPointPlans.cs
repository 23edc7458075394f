using Lookahead.Core.Planning;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Tests.Support;

/// <summary>Plans of a compiled model answered by the interior-point path, finished the way CompiledModel.Plan finishes them.</summary>
internal static class InteriorPointPlans
{
    /// <param name="smallModelKernels">False to run the general loops even where tiles and contiguous rows apply.</param>
    public static InteriorPointProblem Build(CompiledModel model, bool smallModelKernels = true) => new(
        model.Model,
        Matrix<double>.Build.DenseOfRowArrays(model.DiscreteA),
        Matrix<double>.Build.DenseOfRowArrays(model.DiscreteB),
        Matrix<double>.Build.DenseOfRowArrays(model.TerminalWeight),
        allowSmallModelKernels: smallModelKernels);

    /// <summary>
    /// The dual active-set plan of <paramref name="request"/>, as the reference for the interior-point path:
    /// CompiledModel sends a warm-started plan to the active set, and a fresh warm start starts it cold.
    /// </summary>
    public static Plan ActiveSet(CompiledModel model, PlanRequest request) => model.Plan(request, model.CreateWarmStart());

    /// <summary>The plan (inputs, trajectory, cost J with the penalty) and the solver's outcome.</summary>
    public static (Plan Plan, ConstrainedOutcome Outcome) Solve(CompiledModel model, InteriorPointProblem problem, PlanRequest request, double[]? targetState, double[]? targetInput, double? linearWeight)
    {
        var plan = new Plan(model.Horizon, model.StateCount, model.InputCount, model.OutputCount);
        var outcome = InteriorPointPlanner.Solve(problem, plan.Inputs, request.State, request.PreviousInput, request.Reference, targetState, targetInput, linearWeight);
        plan.Status = outcome.Status;
        plan.Iterations = outcome.Iterations;
        plan.ActiveLimits = outcome.ActiveLimits;
        plan.Warnings = outcome.Warnings;
        plan.Cost = model.Trajectory.Evaluate(plan, request.State, request.Reference, targetState, targetInput, request.PreviousInput) + outcome.Penalty;
        if (targetState is not null && targetInput is not null)
        {
            // Only the target itself is read downstream (the KKT check's gradient); its output is not needed here.
            plan.Target = new SteadyStateTarget(targetState, targetInput, [], ReferenceReached: true);
        }

        return (plan, outcome);
    }
}
