using Lookahead.Api.Http;
using Lookahead.Api.Plans;
using Lookahead.Core.Estimation;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;

namespace Lookahead.Api.Stations;

/// <summary>
/// One step of a station, without storage: estimate from the carried estimate, the applied input and the
/// measurement, then plan from that estimate with the applied input as the previous input. The same two calls a
/// client of the stateless /estimate and /plan would chain, with the same values.
/// </summary>
public static class StationStep
{
    public const string Auto = "auto";
    public const string Track = "track";
    public const string TrackingStatus = "tracking";

    /// <summary>What a step produced: the new estimate, the input taken as applied, the move (auto mode) and the answer.</summary>
    public sealed record Outcome(StateEstimate Estimate, double[] AppliedInput, double[]? FirstMove, string Status, IReadOnlyList<Warning> Warnings);

    /// <summary>Checks the body against the model and runs the step; either the outcome or the field errors.</summary>
    /// <param name="previous">The station's estimate (null before its first step).</param>
    /// <param name="lastFirstMove">The move the station suggested last (null before the first step and after a track step).</param>
    public static (Outcome? Outcome, List<ProblemError> Errors) Run(
        CompiledModel model, StationStepRequest body, StateEstimate? previous, double[]? lastFirstMove, PlanRunner runner)
    {
        var errors = new List<ProblemError>();
        string mode = body.Mode ?? Auto;
        if (mode is not (Auto or Track))
        {
            errors.Add(new("mode", $"must be '{Auto}' or '{Track}'"));
        }

        CheckLength(errors, "measurement", body.Measurement, model.OutputCount);
        CheckLength(errors, "appliedInput", body.AppliedInput, model.InputCount);
        CheckLength(errors, "reference", body.Reference, model.OutputCount);
        if (body.Disturbance is not null && model.DisturbanceCount == 0)
        {
            errors.Add(new("disturbance", "the model has no measured disturbances (plant.e)"));
        }
        else
        {
            CheckLength(errors, "disturbance", body.Disturbance, model.DisturbanceCount);
        }

        if (previous is null && body.Measurement is null)
        {
            errors.Add(new("measurement", "is required at a station's first step: the estimate starts from it"));
        }

        var warnings = new List<Warning>();
        double[]? applied = body.AppliedInput;
        if (applied is null)
        {
            if (mode == Track)
            {
                errors.Add(new("appliedInput", "is required in track mode: it is what the operator applied"));
            }
            else if (previous is null)
            {
                // Bumpless start without a reading of the inputs: the plant is assumed to sit at its operating point.
                applied = (double[])model.OperatingPoint.Input.Clone();
                warnings.Add(new Warning(WarningCode.AppliedInputFromOperatingPoint));
            }
            else if (lastFirstMove is not null)
            {
                applied = lastFirstMove;
                warnings.Add(new Warning(WarningCode.AppliedInputAssumed));
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

        EstimateResult estimated;
        try
        {
            estimated = model.Estimate(new EstimateRequest(previous, applied!, body.Measurement, body.Disturbance));
        }
        catch (ModelValidationException ex)
        {
            return (null, ex.Errors.Select(ApiProblems.ToProblemError).ToList());
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
            return (new Outcome(estimated.Estimate, applied!, null, TrackingStatus, warnings), errors);
        }

        var call = PlanFrom(model, estimated.Estimate, applied!, body.Reference, body.Disturbance);
        runner.Run(model, call, PlanDepth.Full, PlanRoute.Plan);
        if (call.Plan is not { } plan)
        {
            return (null, call.Errors);
        }

        warnings.AddRange(plan.Warnings);
        return (new Outcome(estimated.Estimate, applied!, plan.Input(0).ToArray(), WireNames.Status(plan.Status), warnings), errors);
    }

    /// <summary>The plan request /plan would read from { estimate, previousInput, reference?, disturbance? } (lengths already checked).</summary>
    private static PlanCall PlanFrom(CompiledModel model, StateEstimate estimate, double[] applied, double[]? reference, double[]? disturbance)
    {
        var call = new PlanCall(model.StateCount, model.InputCount, model.OutputCount, model.DisturbanceCount, model.Horizon, model.Estimator?.DisturbanceCount ?? 0);
        estimate.State.CopyTo(call.State, 0);
        estimate.Disturbance.CopyTo(call.DisturbanceEstimate, 0);
        call.HasDisturbanceEstimate = true;
        applied.CopyTo(call.PreviousInput, 0);
        call.HasPreviousInput = true;
        if (reference is not null)
        {
            reference.CopyTo(call.Reference, 0);
            call.HasReference = true;
        }

        if (disturbance is not null)
        {
            // One vector is a forecast of one row, held over the horizon (as /plan reads it).
            disturbance.CopyTo(call.DisturbanceRows[0], 0);
            call.DisturbanceRowCount = 1;
        }

        return call;
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
        }
    }
}
