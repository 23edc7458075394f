using Lookahead.Core.Estimation;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;

namespace Lookahead.Api.Replay;

/// <summary>
/// The estimate carried from row to row of one estimation replay. Each row runs one stateless sample of the model's
/// estimator (<see cref="CompiledModel.Estimate"/>: propagate the last row's estimate with this row's applied input,
/// correct it with this row's measurement) and is then planned from the corrected estimate. Not thread-safe: the rows
/// of one replay must pass through it one at a time, in order (the runner does so before planning the batch in parallel).
/// </summary>
internal sealed class EstimationChain(CompiledModel model)
{
    private StateEstimate? carried;

    /// <summary>
    /// Estimates the row and points its plan request at the estimate (x̂ as the state, d̂ as the disturbance estimate,
    /// the applied input as the previous input: it is the input held up to this sample). A row that failed to parse,
    /// or that the estimator refuses, breaks the chain: the next row starts again from its own measurement.
    /// </summary>
    /// <param name="row">A parsed row of an estimation replay.</param>
    /// <param name="pathPrefix">Prepended to the estimator's error paths (the row's place in the body).</param>
    public void Advance(ReplayRow row, string pathPrefix)
    {
        if (row.Errors.Count > 0)
        {
            carried = null;
            return;
        }

        EstimateResult result;
        try
        {
            result = model.Estimate(new EstimateRequest(
                carried,
                row.AppliedInput,
                row.HasMeasurement ? row.Measurement : null,
                row.DisturbanceRowCount > 0 ? row.DisturbanceRows[0] : null));
        }
        catch (ModelValidationException ex)
        {
            foreach (var error in ex.Errors)
            {
                row.AddError(pathPrefix + WirePath(error.Path), error.Reason);
            }

            carried = null;
            return;
        }

        carried = result.Estimate;
        row.Estimate = result.Estimate;
        result.Estimate.State.CopyTo(row.State, 0);
        result.Estimate.Disturbance.CopyTo(row.DisturbanceEstimate, 0);
        row.HasDisturbanceEstimate = row.DisturbanceEstimate.Length > 0;
        row.AppliedInput.CopyTo(row.PreviousInput, 0);
        row.HasPreviousInput = true;
        if (!result.MeasurementUsed)
        {
            row.EstimationWarnings.Add(new Warning(WarningCode.MeasurementMissing));
        }

        if (result.Initialised)
        {
            row.EstimationWarnings.Add(new Warning(WarningCode.EstimateInitialised));
        }
    }

    /// <summary>The core names the measured disturbance of a sample "measuredDisturbance"; a replay row calls it "disturbance".</summary>
    private static string WirePath(string corePath) =>
        corePath.StartsWith("measuredDisturbance", StringComparison.Ordinal) ? "disturbance" + corePath["measuredDisturbance".Length..] : corePath;
}
