namespace Lookahead.Core.Planning;

/// <summary>What each plan of a closed-loop run starts from.</summary>
public enum SimulationFeedback
{
    /// <summary>The true plant's state: an ideal, noise-free full-state measurement (no estimator involved).</summary>
    State,

    /// <summary>
    /// The model's estimator, fed with the measurements y_k = C x_k + o_k + noise: each plan starts from x̂⁺(k) with the
    /// disturbance estimate d̂⁺(k), as a station would run it.
    /// </summary>
    Estimate,
}
