namespace Lookahead.Core.Planning;

/// <summary>The equilibrium x_s = A x_s + B u_s the plan steers to, chosen so that C x_s is as close to r as possible.</summary>
/// <param name="State">x_s (n).</param>
/// <param name="Input">u_s (m).</param>
/// <param name="Output">C x_s (p).</param>
/// <param name="ReferenceReached">True when ‖C x_s − r‖∞ ≤ 1e-9·max(1, ‖r‖∞).</param>
/// <param name="LimitedByInputLimits">True when the hard input limits moved the target away from the unconstrained one.</param>
public sealed record SteadyStateTarget(double[] State, double[] Input, double[] Output, bool ReferenceReached, bool LimitedByInputLimits = false)
{
    /// <summary>‖C x_s − r‖∞: how far the steady output stays from the setpoint.</summary>
    public double OutputError { get; init; }
}
