using Lookahead.Api.Http;
using Lookahead.Api.Plans;
using Lookahead.Core.Estimation;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;

namespace Lookahead.Api.Stations;

/// <summary>
/// One step of a station, without storage: bridge missed samples, estimate from the carried estimate, the applied
/// input and the measurement, then plan from that estimate with the applied input as the previous input. The same
/// calls a client of the stateless /estimate and /plan would chain, with the same values.
/// </summary>
public static class StationStep
{
    public const string Auto = "auto";
    public const string Track = "track";
    public const string TrackingStatus = "tracking";

    /// <summary>What the station carries into a step.</summary>
    /// <param name="Previous">The station's estimate (null before its first step, or when it starts over).</param>
    /// <param name="LastFirstMove">The move the station suggested last (null before the first step, after a track step, or when the model's inputs changed).</param>
    /// <param name="MissedSamples">Samples to propagate through before this one (from the timestamps).</param>
    /// <param name="Full">Answer with the whole plan, not only its first move.</param>
    public sealed record Carried(StateEstimate? Previous, double[]? LastFirstMove, int MissedSamples, bool Full);

    /// <summary>What a step produced: the new estimate, the input taken as applied, the move (auto mode) and the answer.</summary>
    /// <param name="Plan">The whole plan (auto mode only).</param>
    public sealed record Outcome(StateEstimate Estimate, double[] AppliedInput, double[]? FirstMove, Plan? Plan, double SolveMicroseconds, string Status, IReadOnlyList<Warning> Warnings);

    /// <summary>Checks the body against the model and runs the step; either the outcome or the field errors.</summary>
    public static (Outcome? Outcome, List<ProblemError> Errors) Run(CompiledModel model, StationStepRequest body, Carried carried, PlanRunner runner)
    {
        var errors = new List<ProblemError>();
        string mode = body.Mode ?? Auto;
        if (mode is not (Auto or Track))
        {
            errors.Add(new("mode", $"must be '{Auto}' or '{Track}'"));
        }

        CheckLength(errors, "measurement", body.Measurement, model.OutputCount);
        CheckLength(errors, "appliedInput", body.AppliedInput, model.InputCount);
        CheckRows(errors, "reference", body.Reference, model.OutputCount, model.Horizon);
        if (body.Disturbance is not null && model.DisturbanceCount == 0)
        {
            errors.Add(new("disturbance", "the model has no measured disturbances (plant.e)"));
        }
        else
        {
            CheckRows(errors, "disturbance", body.Disturbance, model.DisturbanceCount, model.Horizon);
        }

        var previous = carried.Previous;
        if (previous is null && body.Measurement is null)
        {
            errors.Add(new("measurement", "is required at a station's first step (or when it starts over): the estimate starts from it"));
        }

        var warnings = new List<Warning>();
        double[]? applied = body.AppliedInput;
        if (applied is null)
        {
            if (mode == Track)
            {
                errors.Add(new("appliedInput", "is required in track mode: it is what the operator applied"));
            }
            else if (carried.LastFirstMove is not null)
            {
                applied = carried.LastFirstMove;
                warnings.Add(new Warning(WarningCode.AppliedInputAssumed));
            }
            else if (previous is null)
            {
                // Bumpless start without a reading of the inputs: the plant is assumed to sit at its operating point.
                applied = (double[])model.OperatingPoint.Input.Clone();
                warnings.Add(new Warning(WarningCode.AppliedInputFromOperatingPoint));
            }
            else
            {
                errors.Add(new("appliedInput", "is required: the last step suggested no move (it was a track step)"));
            }
        }

        if (errors.Count > 0)
        {
            return (null, errors);
        }

        double[]? disturbanceNow = body.Disturbance?.Rows[0];
        EstimateResult estimated;
        try
        {
            // A missed sample is a sample without a reading: the plant held the applied input through it.
            for (int i = 0; i < carried.MissedSamples && previous is not null; i++)
            {
                previous = model.Estimate(new EstimateRequest(previous, applied!, null, disturbanceNow)).Estimate;
            }

            estimated = model.Estimate(new EstimateRequest(previous, applied!, body.Measurement, disturbanceNow));
        }
        catch (ModelValidationException ex)
        {
            return (null, ex.Errors.Select(ApiProblems.ToProblemError).ToList());
        }

        if (carried.MissedSamples > 0 && carried.Previous is not null)
        {
            warnings.Add(new Warning(WarningCode.SamplesMissed) { Count = carried.MissedSamples });
        }

        if (!estimated.MeasurementUsed)
        {
            warnings.Add(new Warning(WarningCode.MeasurementMissing));
        }

        if (estimated.Initialised)
        {
            warnings.Add(new Warning(WarningCode.EstimateInitialised));
        }

        if (mode == Track)
        {
            return (new Outcome(estimated.Estimate, applied!, null, null, 0, TrackingStatus, warnings), errors);
        }

        var call = PlanFrom(model, estimated.Estimate, applied!, body.Reference, body.Disturbance);
        runner.Run(model, call, PlanDepth.Full, PlanRoute.Station);
        if (call.Plan is not { } plan)
        {
            return (null, call.Errors);
        }

        warnings.AddRange(plan.Warnings);
        var outcome = new Outcome(
            estimated.Estimate, applied!, plan.Input(0).ToArray(), carried.Full ? plan : null, call.SolveMicroseconds, WireNames.Status(plan.Status), warnings);
        return (outcome, errors);
    }

    /// <summary>The plan request /plan would read from { estimate, previousInput, reference?, disturbance? } (sizes already checked).</summary>
    private static PlanCall PlanFrom(CompiledModel model, StateEstimate estimate, double[] applied, VectorOrRows? reference, VectorOrRows? disturbance)
    {
        var call = new PlanCall(model.StateCount, model.InputCount, model.OutputCount, model.DisturbanceCount, model.Horizon, model.Estimator?.DisturbanceCount ?? 0);
        estimate.State.CopyTo(call.State, 0);
        estimate.Disturbance.CopyTo(call.DisturbanceEstimate, 0);
        call.HasDisturbanceEstimate = true;
        applied.CopyTo(call.PreviousInput, 0);
        call.HasPreviousInput = true;
        if (reference is not null)
        {
            if (reference.IsVector)
            {
                reference.Rows[0].CopyTo(call.Reference, 0);
                call.HasReference = true;
            }
            else
            {
                Copy(reference.Rows, call.ReferenceRows);
                call.ReferenceRowCount = reference.Rows.Length;
            }
        }

        if (disturbance is not null)
        {
            // One vector is a forecast of one row, held over the horizon (as /plan reads it).
            Copy(disturbance.Rows, call.DisturbanceRows);
            call.DisturbanceRowCount = disturbance.Rows.Length;
        }

        return call;
    }

    private static void Copy(double[][] rows, double[][] into)
    {
        for (int k = 0; k < rows.Length; k++)
        {
            rows[k].CopyTo(into[k], 0);
        }
    }

    private static void CheckRows(List<ProblemError> errors, string path, VectorOrRows? value, int width, int horizon)
    {
        if (value is null)
        {
            return;
        }

        if (value.IsVector)
        {
            CheckLength(errors, path, value.Rows[0], width);
            return;
        }

        if (value.Rows.Length > horizon)
        {
            errors.Add(new(path, $"has {value.Rows.Length} rows; give 1 to {horizon} (the horizon), the last one is held to the end"));
            return;
        }

        for (int k = 0; k < value.Rows.Length; k++)
        {
            CheckLength(errors, $"{path}[{k}]", value.Rows[k], width);
        }
    }

    private static void CheckLength(List<ProblemError> errors, string path, double[]? values, int expected)
    {
        if (values is null)
        {
            return;
        }

        if (values.Length != expected)
        {
            errors.Add(new(path, $"has {values.Length} entries; expected {expected}"));
            return;
        }

        for (int i = 0; i < values.Length; i++)
        {
            if (!double.IsFinite(values[i]))
            {
                errors.Add(new($"{path}[{i}]", "must be a finite number"));
            }
            else if (Math.Abs(values[i]) > ModelValidator.MaxMagnitude)
            {
                // A station keeps the estimate a step makes: a reading of 1e308 taken in track mode would leave it an
                // estimate no later plan can start from. Its numbers are bounded like a model's own.
                errors.Add(new($"{path}[{i}]", $"is {values[i]:g3}; a station refuses values beyond {ModelValidator.MaxMagnitude:g3} in magnitude (the bound on a model's own numbers), since it keeps the estimate they make"));
            }
        }
    }
}
