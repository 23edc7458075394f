using System.Globalization;
using System.Numerics;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Http;

/// <summary>
/// Writes the sentence for each warning code. The core reports codes and numbers only, so the wording lives here
/// and a receiving system can key on the code while an operator reads the message.
/// </summary>
public static class WarningText
{
    public static WarningDto ToDto(Warning warning) => new(
        WireNames.Warning(warning.Code),
        Message(warning),
        warning.Input,
        warning.Output,
        warning.Step,
        warning.Limit is { } limit ? WireNames.Limit(limit) : null,
        warning.Amount is { } amount && double.IsFinite(amount) ? amount : null,
        warning.Count,
        warning.Eigenvalue is { } z ? new ComplexDto(z.Real, z.Imaginary) : null);

    public static IReadOnlyList<WarningDto> ToDtos(IReadOnlyList<Warning> warnings)
    {
        if (warnings.Count == 0)
        {
            return [];
        }

        var result = new WarningDto[warnings.Count];
        for (int i = 0; i < result.Length; i++)
        {
            result[i] = ToDto(warnings[i]);
        }

        return result;
    }

    public static string Message(Warning w) => w.Code switch
    {
        WarningCode.SetpointUnreachable =>
            $"the setpoint is not an equilibrium the inputs can hold; the plan steers to the closest steady state (least squares), {G(w.Amount)} away at worst",
        WarningCode.SetpointOutsideInputLimits =>
            $"the setpoint cannot be held within the input limits; the plan steers to the closest reachable steady state, {G(w.Amount)} away at worst",
        WarningCode.FirstMoveRateRelaxed =>
            $"infeasible: input {w.Input} cannot reach its window from the previous input within its rate limit; the plan keeps the input limits and relaxes that input's first rate limit only — do not apply it unchecked",
        WarningCode.IterationLimit =>
            $"the solver stopped at its iteration budget ({w.Count}); the inputs are the best point found, moved onto the hard input and rate limits, and are not optimal",
        WarningCode.LimitsContradict => w.Limit is { } kind
            ? $"infeasible: the hard limits contradict each other (blocked at {WireNames.Limit(kind)}, step {w.Step}, {(w.Output is { } o ? $"output {o}" : $"input {w.Input}")}); the inputs were moved onto the hard input and rate limits"
            : "infeasible: the hard limits contradict each other; the inputs were moved onto the hard input and rate limits",
        WarningCode.SoftOutputLimitExceeded =>
            $"the predicted outputs exceed their soft limits by up to {G(w.Amount)} (output {w.Output}, step {w.Step}): the hard limits leave no plan that respects them",
        WarningCode.DisturbanceNotBalanced =>
            $"no steady state balances the measured disturbance's last row; the plan steers to the least-squares one, off by {G(w.Amount)} at worst in x = Ax + Bu + Ev",
        WarningCode.DisturbanceTargetOutsideInputLimits =>
            $"holding the setpoint against the estimated input disturbance needs inputs up to {G(w.Amount)} beyond their limits; the plan respects the limits and steers toward that steady state, which it cannot reach",
        WarningCode.MeasurementMissing =>
            "no measurement this sample: the estimate was propagated with the applied input but not corrected; it drifts until readings return",
        WarningCode.EstimateInitialised =>
            "started without a previous estimate: fitted to this measurement as if the plant were at steady state with the applied input, the rest put in the disturbance estimate",
        WarningCode.AppliedInputAssumed =>
            "no applied input was given: the first move suggested at the previous step was taken as what the plant received",
        WarningCode.AppliedInputFromOperatingPoint =>
            "no applied input was given for the first step: the model's operating-point input was taken as the input the plant holds, and the first move is rate-limited from it",
        WarningCode.SamplesMissed =>
            $"{w.Count} sample(s) were missed since the last step: the estimate was propagated through them with the applied input held, without correction",
        WarningCode.StationRestartedAfterGap =>
            $"{w.Count} samples were missed since the last step, more than the station propagates through: the estimate started over from this measurement",
        WarningCode.ModelChangedEstimateKept =>
            "the station's alias now names another model with the same dimensions: this step used it and carried the estimate over",
        WarningCode.ModelChangedEstimateRestarted =>
            "the station's alias now names a model with other dimensions: this step used it and started the estimate over from this measurement",
        WarningCode.AliasGoneModelKept =>
            "the station's alias no longer exists: this step used the model the station last stepped with",
        WarningCode.StepsNotOptimal =>
            $"{w.Count} steps did not reach a clean optimum",
        WarningCode.ClosedLoopUnstable =>
            $"closed loop unstable with this horizon and terminal weight: spectral radius of A − BK is {G(w.Amount)}; lengthen the horizon or use the 'riccati' terminal weight",
        WarningCode.NotStabilisable =>
            $"the plant is not stabilisable: the mode at λ = {Eigen(w.Eigenvalue)} cannot be moved by any input",
        WarningCode.NotControllable =>
            $"the plant is not controllable (controllability rank {w.Count}); the uncontrollable modes are stable and will decay on their own",
        WarningCode.ModeUnseenByCost =>
            $"a mode with |λ| ≥ 1 (λ = {Eigen(w.Eigenvalue)}) is not seen by the output weight; plans will not act on it",
        WarningCode.HessianIllConditioned =>
            $"the condensed Hessian is ill-conditioned (condition number {G(w.Amount, "g3")}); plans may lose accuracy — shorten the horizon, raise the input weight, or rescale the model",
        _ => throw new ArgumentOutOfRangeException(nameof(w), w.Code, "no message"),
    };

    private static string G(double? value, string format = "g4") =>
        value is { } v ? v.ToString(format, CultureInfo.InvariantCulture) : "?";

    private static string Eigen(Complex? value)
    {
        if (value is not { } z)
        {
            return "?";
        }

        string real = z.Real.ToString("g6", CultureInfo.InvariantCulture);
        return z.Imaginary == 0 ? real : real + z.Imaginary.ToString("+0.######;-0.######", CultureInfo.InvariantCulture) + "i";
    }
}
