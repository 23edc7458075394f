using Lookahead.Core.Models;

namespace Lookahead.Core.Planning;

/// <summary>From step <paramref name="FromStep"/> on, track <paramref name="Reference"/> (p).</summary>
public sealed record ReferenceChange(int FromStep, double[] Reference);

/// <summary>From step <paramref name="FromStep"/> on, the measured disturbances are <paramref name="Disturbance"/> (q, engineering units with an operating point).</summary>
public sealed record MeasuredDisturbanceChange(int FromStep, double[] Disturbance);

/// <summary>From step <paramref name="FromStep"/> on, <paramref name="Offset"/> (p, an offset, never shifted) is added to the true outputs: a step load the model does not know.</summary>
public sealed record OutputDisturbanceChange(int FromStep, double[] Offset);

/// <summary>Gaussian noise on every measurement: entry j of each sample's noise is σ_j z with z standard normal.</summary>
/// <param name="StandardDeviation">σ (p entries, each ≥ 0; 0 leaves that output noise-free).</param>
/// <param name="Seed">Seed of the generator (<see cref="GaussianNoise"/>): the same seed gives the same noise.</param>
public sealed record MeasurementNoise(double[] StandardDeviation, int Seed = 0);

/// <summary>A closed-loop run: each step plans from the current state (or its estimate) and applies the first move.</summary>
/// <param name="InitialState">x_0 (n).</param>
/// <param name="Steps">Number of steps T ≥ 1.</param>
/// <param name="References">Setpoint schedule, sorted by step; none means regulation.</param>
/// <param name="TruePlant">Plant that actually moves (same n and m), discretised at the model's sample time if continuous; null means the model itself.</param>
/// <param name="Disturbances">Additive state disturbance w_k (rows of n) in x_{k+1} = A x_k + B u_k + E v_k + w_k; missing rows are zero. Unmeasured: no plan sees it.</param>
/// <param name="PreviousInput">Input applied before step 0, if known.</param>
/// <param name="MeasuredDisturbances">
/// Schedule of the measured disturbances v_k (q; the model needs plant.e), sorted by step, zero before the first
/// change. v_k drives the true plant through E and is given to the plan of step k as a held disturbance.
/// </param>
/// <param name="OutputDisturbance">Schedule of an unmeasured offset o_k (p) on the true outputs, y_k = C x_k + o_k; zero before the first change.</param>
/// <param name="Feedback">What each plan starts from: the true state, or the model estimator's estimate from the measurements.</param>
/// <param name="MeasurementNoise">Noise added to each measurement; null means exact measurements.</param>
public sealed record SimulationRequest(
    double[] InitialState,
    int Steps,
    IReadOnlyList<ReferenceChange>? References = null,
    PlantSpec? TruePlant = null,
    double[][]? Disturbances = null,
    double[]? PreviousInput = null,
    IReadOnlyList<MeasuredDisturbanceChange>? MeasuredDisturbances = null,
    IReadOnlyList<OutputDisturbanceChange>? OutputDisturbance = null,
    SimulationFeedback Feedback = SimulationFeedback.State,
    MeasurementNoise? MeasurementNoise = null);
