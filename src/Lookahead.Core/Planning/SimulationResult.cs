namespace Lookahead.Core.Planning;

/// <summary>Trajectories of a closed-loop run, row-major: states and outputs (T+1) rows, inputs and references T rows.</summary>
/// <param name="TotalCost">Σ_k of the stage cost (y_k − r_k)ᵀQ(y_k − r_k) + (u_k − u_s,k)ᵀR(u_k − u_s,k) + Δu_kᵀSΔu_k over the run.</param>
/// <param name="NonOptimalSteps">Steps whose plan was not <see cref="PlanStatus.Optimal"/>.</param>
public sealed record SimulationResult(
    int Steps,
    double[][] States,
    double[][] Inputs,
    double[][] Outputs,
    double[][]? References,
    double TotalCost,
    int NonOptimalSteps,
    IReadOnlyList<Warning> Warnings);
