using Lookahead.Core.Estimation;
using Lookahead.Core.Numerics;
using Lookahead.Core.Validation;

namespace Lookahead.Core.Planning;

/// <summary>The model's estimator at the model's boundary: engineering units in and out, measured disturbances in the prediction.</summary>
public sealed partial class CompiledModel
{
    /// <summary>
    /// One estimator sample (stateless): propagate the previous estimate with the applied input (and E v), then correct
    /// it with the measurement; without a previous estimate, fit one to the measurement at steady state. States,
    /// inputs, measurements and disturbances are in engineering units when the model has an operating point; the
    /// disturbance estimate d̂ is an offset (output or input units) and is never shifted.
    /// </summary>
    /// <exception cref="ModelValidationException">The model has no estimator, or a vector is missing, of the wrong length or not finite.</exception>
    public EstimateResult Estimate(EstimateRequest request)
    {
        var estimator = Estimator ?? throw new ModelValidationException("estimator", "the model has no estimator: register it with one to estimate from measurements");
        var point = OperatingPoint;
        if (request.MeasuredDisturbance is not null && request.MeasuredDisturbance.Length != DisturbanceCount)
        {
            throw new ModelValidationException("measuredDisturbance", DisturbanceCount == 0
                ? "the model has no measured disturbances (plant.e)"
                : $"has {request.MeasuredDisturbance.Length} entries; expected {DisturbanceCount}");
        }

        if (request.AppliedInput is null)
        {
            throw new ModelValidationException("appliedInput", "is required (the input held since the previous sample)");
        }

        var input = OperatingPoint.Minus(request.AppliedInput, point.Input)!;
        var measurement = OperatingPoint.Minus(request.Measurement, point.Output);
        var drive = StateDrive(OperatingPoint.Minus(request.MeasuredDisturbance, point.Disturbance));
        EstimateResult result;
        if (request.Previous is null)
        {
            var initial = estimator.Initialise(measurement, input, drive);
            var corrected = estimator.Correct(initial, measurement);
            result = new EstimateResult(initial, corrected.PredictedMeasurement, corrected.Innovation, true, Initialised: true);
        }
        else
        {
            var previous = request.Previous with { State = OperatingPoint.Minus(request.Previous.State, point.State)! };
            var prior = estimator.Predict(previous, input, drive);
            var corrected = estimator.Correct(prior, measurement);
            result = new EstimateResult(corrected.Estimate, corrected.PredictedMeasurement, corrected.Innovation, corrected.MeasurementUsed, Initialised: false);
        }

        return result with
        {
            Estimate = result.Estimate with { State = OperatingPoint.Plus(result.Estimate.State, point.State) },
            PredictedMeasurement = OperatingPoint.Plus(result.PredictedMeasurement, point.Output),
        };
    }

    /// <summary>E v (n) for measured disturbances in deviations, or null.</summary>
    private double[]? StateDrive(double[]? disturbance)
    {
        if (disturbance is null || DisturbanceCount == 0)
        {
            return null;
        }

        foreach (double v in disturbance)
        {
            if (!double.IsFinite(v))
            {
                throw new ModelValidationException("measuredDisturbance", "must hold finite numbers");
            }
        }

        var drive = new double[StateCount];
        DenseKernels.MultiplyAddColumns(eColumnMajor, disturbance, drive);
        return drive;
    }
}
