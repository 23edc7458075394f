namespace Lookahead.Core.Planning;

/// <summary>
/// Trajectories of a closed-loop run, row-major: states, outputs, measurements and estimates (T+1) rows, inputs and
/// references T rows. Row k of the estimates is x̂⁺(k), the estimate corrected with measurement k (the one plan k
/// started from; row T is corrected with the last measurement but planned from by no one).
/// </summary>
/// <param name="Outputs">True outputs y_k = C x_k + o_k (o_k the output disturbance, zero without one).</param>
/// <param name="TotalCost">Σ_k of the stage cost (y_k − r_k)ᵀQ(y_k − r_k) + (u_k − u_s,k)ᵀR(u_k − u_s,k) + Δu_kᵀSΔu_k over the run.</param>
/// <param name="NonOptimalSteps">Steps whose plan was not <see cref="PlanStatus.Optimal"/>.</param>
/// <param name="Measurements">What the sensors read: y_k plus the measurement noise (equal to the outputs without noise).</param>
/// <param name="Estimates">x̂⁺(k) (n) with feedback from the estimate; null otherwise.</param>
/// <param name="DisturbanceEstimates">d̂⁺(k) (n_d; an offset, never shifted by the operating point) with feedback from the estimate; null otherwise.</param>
/// <param name="EstimatedOutputs">C x̂⁺(k) + C_d d̂⁺(k) (p), the outputs as the estimator sees them, with feedback from the estimate; null otherwise.</param>
public sealed record SimulationResult(
    int Steps,
    double[][] States,
    double[][] Inputs,
    double[][] Outputs,
    double[][]? References,
    double TotalCost,
    int NonOptimalSteps,
    IReadOnlyList<Warning> Warnings,
    double[][]? Measurements = null,
    double[][]? Estimates = null,
    double[][]? DisturbanceEstimates = null,
    double[][]? EstimatedOutputs = null);
