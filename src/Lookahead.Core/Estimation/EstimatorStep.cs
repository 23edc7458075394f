namespace Lookahead.Core.Estimation;

/// <summary>One sample of the estimator: see <see cref="Estimator.Step"/> for the timing.</summary>
/// <param name="Corrected">The estimate for this sample, corrected with this sample's measurement (plan from this one).</param>
/// <param name="NextPrior">The prior for the next sample, A_a x̂⁺ + B_a u; send it back with the next measurement.</param>
/// <param name="Initialised">
/// True when no estimate was given and <see cref="Corrected"/> is the steady-state estimate of
/// <see cref="Estimator.Initialise"/>; its innovation is then the steady-state fit's residual, not a prediction error.
/// </param>
public sealed record EstimatorStep(CorrectedEstimate Corrected, StateEstimate NextPrior, bool Initialised);
