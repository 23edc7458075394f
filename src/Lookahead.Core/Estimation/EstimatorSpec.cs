using Lookahead.Core.Models;

namespace Lookahead.Core.Estimation;

/// <summary>
/// What the steady-state Kalman estimator is designed from. Checked by <see cref="EstimatorSpecValidator"/>.
/// </summary>
/// <param name="ProcessNoise">
/// Covariance W of the noise driving the augmented state [x; d], size n + n_d: a vector (a diagonal matrix) or a
/// full symmetric positive semidefinite matrix. The disturbance entries decide how fast d̂ follows a change in the
/// disturbance: larger means faster and noisier.
/// </param>
/// <param name="MeasurementNoise">Covariance V of the measurement noise, p entries or p×p; positive definite.</param>
/// <param name="DisturbanceModel">Where the integrating disturbances enter; <see cref="DisturbanceModelKind.Output"/> by default.</param>
public sealed record EstimatorSpec(
    WeightSpec? ProcessNoise,
    WeightSpec? MeasurementNoise,
    DisturbanceModelKind DisturbanceModel = DisturbanceModelKind.Output);
