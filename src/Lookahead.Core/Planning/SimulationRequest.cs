using Lookahead.Core.Models;

namespace Lookahead.Core.Planning;

/// <summary>From step <paramref name="FromStep"/> on, track <paramref name="Reference"/> (p).</summary>
public sealed record ReferenceChange(int FromStep, double[] Reference);

/// <summary>A closed-loop run: each step plans from the current state and applies the first move.</summary>
/// <param name="InitialState">x_0 (n).</param>
/// <param name="Steps">Number of steps T ≥ 1.</param>
/// <param name="References">Setpoint schedule, sorted by step; none means regulation.</param>
/// <param name="TruePlant">Plant that actually moves (same n and m), discretised at the model's sample time if continuous; null means the model itself.</param>
/// <param name="Disturbances">Additive state disturbance w_k (rows of n) in x_{k+1} = A x_k + B u_k + w_k; missing rows are zero.</param>
/// <param name="PreviousInput">Input applied before step 0, if known.</param>
public sealed record SimulationRequest(
    double[] InitialState,
    int Steps,
    IReadOnlyList<ReferenceChange>? References = null,
    PlantSpec? TruePlant = null,
    double[][]? Disturbances = null,
    double[]? PreviousInput = null);
