using Lookahead.Core.Numerics;
using Lookahead.Core.Validation;

namespace Lookahead.Core.Planning;

/// <summary>
/// The refusal of a request whose finite values still overflow the prediction or its cost, naming the field to
/// blame: <c>state</c>, <c>reference</c>, <c>previousInput</c>, or <c>plant</c> when the values are modest for what
/// the plant and horizon do with them.
/// <para>
/// The unconstrained plan is linear in the request, so each field's share can be predicted alone. For a field v,
/// its unit-size version v/‖v‖∞ is planned and rolled out with every other field zero; the growth g is the
/// largest of 1, |u|, |x|, |y| and √J along that share (∞ when the share itself overflows). The share of v is then
/// about ‖v‖∞·g. The field with the largest share is blamed when its own size supplies at least as many orders of
/// magnitude as the growth (‖v‖∞ ≥ g); otherwise the plant is. Limits are ignored here: they only cut a plan down.
/// Computed only on the failure path, at the price of one unconstrained plan per field given.
/// </para>
/// </summary>
internal static class PredictionOverflow
{
    public const string State = "state";
    public const string Reference = "reference";
    public const string PreviousInput = "previousInput";
    public const string Plant = "plant";

    public static ModelValidationException Refusal(string field) => new(
        field,
        field == Plant
            ? "the predicted trajectory or its cost overflows for this plant and horizon even though the request's values are modest; shorten the horizon or pre-stabilise the plant"
            : "the values are too large: the predicted trajectory or its cost overflows for this plant and horizon");

    /// <summary>The field to blame for an overflow of <paramref name="request"/> planned with <paramref name="gains"/>.</summary>
    public static string Blame(PlanRequest request, GainSet gains, TargetMap targets, TrajectoryEvaluator trajectory, int horizon, int n, int m, int p)
    {
        string blamed = Plant;
        double largestShare = double.NegativeInfinity;
        bool valueDominates = false;
        void Consider(string field, double[]? values)
        {
            double size = values is null ? 0 : MaxAbs(values);
            if (!(size > 0))
            {
                return;
            }

            double growth = UnitShareGrowth(field, values!, 1 / size, gains, targets, trajectory, horizon, n, m, p);

            // In orders of magnitude, so that neither the share nor the comparison can overflow.
            double share = Math.Log10(size) + Math.Log10(growth);
            if (share > largestShare)
            {
                largestShare = share;
                blamed = field;
                valueDominates = size >= growth;
            }
        }

        Consider(State, request.State);
        Consider(Reference, request.Reference);
        Consider(PreviousInput, request.PreviousInput);
        return valueDominates ? blamed : Plant;
    }

    /// <summary>g for the share of one field scaled by <paramref name="scale"/> = 1/‖v‖∞; +∞ when that share overflows.</summary>
    private static double UnitShareGrowth(string field, double[] values, double scale, GainSet gains, TargetMap targets, TrajectoryEvaluator trajectory, int horizon, int n, int m, int p)
    {
        var unit = values.Select(v => v * scale).ToArray();
        var state = field == State ? unit : new double[n];
        double[] reference = [];
        double[] targetState = [];
        double[] targetInput = [];
        double[] previousInput = field == PreviousInput ? unit : [];
        if (field == Reference)
        {
            reference = unit;
            targetState = new double[n];
            targetInput = new double[m];
            DenseKernels.Multiply(targets.StateMap, reference, targetState);
            DenseKernels.Multiply(targets.InputMap, reference, targetInput);
        }

        var share = new Plan(horizon, n, m, p);
        gains.Apply(state, reference, targetState, targetInput, previousInput, share.Inputs);
        double cost = trajectory.Evaluate(share, state, reference, targetState, targetInput, previousInput);
        double growth = Math.Max(1, Math.Max(MaxAbs(share.Inputs), Math.Max(MaxAbs(share.States), MaxAbs(share.Outputs))));
        growth = Math.Max(growth, Math.Sqrt(Math.Max(cost, 0)));
        return double.IsFinite(growth) && double.IsFinite(cost) ? growth : double.PositiveInfinity;
    }

    /// <summary>‖v‖∞, or NaN when an entry is NaN (so an overflowed share never counts as small).</summary>
    private static double MaxAbs(ReadOnlySpan<double> values)
    {
        double largest = 0;
        foreach (double v in values)
        {
            if (double.IsNaN(v))
            {
                return double.NaN;
            }

            largest = Math.Max(largest, Math.Abs(v));
        }

        return largest;
    }
}
