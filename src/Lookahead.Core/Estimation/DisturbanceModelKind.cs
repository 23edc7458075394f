namespace Lookahead.Core.Estimation;

/// <summary>
/// Where the estimator assumes the unmeasured, slowly varying disturbances d enter. Each is modelled as an
/// integrator d(k+1) = d(k), so a constant disturbance is estimated without steady offset.
/// </summary>
public enum DisturbanceModelKind
{
    /// <summary>One disturbance per output added to the measurement: B_d = 0 (n×p), C_d = I_p, n_d = p.</summary>
    Output,

    /// <summary>One disturbance per input added to the input: B_d = B (n×m), C_d = 0 (p×m), n_d = m.</summary>
    Input,

    /// <summary>No disturbance states: a plain state estimator, n_d = 0 (no offset-free guarantee).</summary>
    None,
}
