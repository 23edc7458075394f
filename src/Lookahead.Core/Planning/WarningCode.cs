namespace Lookahead.Core.Planning;

/// <summary>
/// What a plan, a simulation or a compiled model reports beyond a clean optimum. The core gives the code and its
/// numbers (<see cref="Warning"/>); the shell writes the sentence, so wording can change without touching numerics.
/// </summary>
public enum WarningCode
{
    /// <summary>No equilibrium holds the setpoint; the plan steers to the least-squares steady state. Amount: worst |C x_s − r|.</summary>
    SetpointUnreachable,

    /// <summary>The setpoint cannot be held inside the input limits; the target is the closest limited steady state. Amount: worst |C x_s − r|.</summary>
    SetpointOutsideInputLimits,

    /// <summary>The first move of one input cannot reach its window within its rate limit, so that one rate limit was relaxed. Input: its index.</summary>
    FirstMoveRateRelaxed,

    /// <summary>The solver stopped at its iteration cap; inputs were projected onto their limits. Count: the cap.</summary>
    IterationLimit,

    /// <summary>The hard limits contradict each other. Limit, Step and Index: the row that blocked.</summary>
    LimitsContradict,

    /// <summary>A soft output limit is exceeded because the hard limits leave no plan that meets it. Output, Step, Amount: the worst excess.</summary>
    SoftOutputLimitExceeded,

    /// <summary>Some steps of a closed-loop run were not a clean optimum. Count: how many.</summary>
    StepsNotOptimal,

    /// <summary>The receding-horizon closed loop is unstable. Amount: ρ(A − BK).</summary>
    ClosedLoopUnstable,

    /// <summary>A mode with |λ| ≥ 1 cannot be moved by any input. Eigenvalue: that mode.</summary>
    NotStabilisable,

    /// <summary>Some modes cannot be moved, all of them stable. Count: the controllability rank.</summary>
    NotControllable,

    /// <summary>A mode with |λ| ≥ 1 is not seen by the output weight. Eigenvalue: that mode.</summary>
    ModeUnseenByCost,

    /// <summary>The condensed Hessian is ill-conditioned. Amount: its condition number.</summary>
    HessianIllConditioned,

    /// <summary>No steady state balances the last measured disturbance row; the target is the least-squares one. Amount: the worst residual of x_s = A x_s + B u_s + E v̄.</summary>
    DisturbanceNotBalanced,

    /// <summary>The steady state that balances an input-disturbance estimate needs inputs outside their limits; the plan keeps the limits and steers toward it. Amount: the worst excess.</summary>
    DisturbanceTargetOutsideInputLimits,

    /// <summary>The estimator had no measurement this sample: the estimate was propagated, not corrected.</summary>
    MeasurementMissing,

    /// <summary>No previous estimate was given: this one was fitted to the measurement at steady state, so its first plans rest on that assumption.</summary>
    EstimateInitialised,

    /// <summary>A station step gave no applied input: the move the station suggested last time was taken as applied.</summary>
    AppliedInputAssumed,

    /// <summary>A station's first step gave no applied input: the model's operating-point input was taken as the input the plant holds.</summary>
    AppliedInputFromOperatingPoint,

    /// <summary>A station's step came more than 1.5 sample times after the last one: the estimate was propagated through the missed samples with the applied input held. Count: the samples missed.</summary>
    SamplesMissed,

    /// <summary>A station's step came after more missed samples than the station propagates through: its estimate started over from this measurement. Count: the samples missed.</summary>
    StationRestartedAfterGap,

    /// <summary>A station's alias now names another model of the same dimensions: the step used it and carried the estimate over.</summary>
    ModelChangedEstimateKept,

    /// <summary>A station's alias now names a model of other dimensions: the step used it and started the estimate over from this measurement.</summary>
    ModelChangedEstimateRestarted,

    /// <summary>A station's alias no longer exists: the step used the model the station last stepped with.</summary>
    AliasGoneModelKept,
}
