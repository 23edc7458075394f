namespace Lookahead.Core.Estimation;

/// <summary>An estimate of the augmented state [x; d] at one sample.</summary>
/// <param name="State">Plant state estimate x̂, n entries (deviation variables).</param>
/// <param name="Disturbance">Disturbance estimate d̂, n_d entries (empty for <see cref="DisturbanceModelKind.None"/>).</param>
public sealed record StateEstimate(double[] State, double[] Disturbance);
