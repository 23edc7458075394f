using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Validation;

/// <summary>
/// A model whose shapes, numbers and definiteness have been checked, as dense matrices.
/// A and B are still in the document's time domain; weights are symmetrised; limits are in deviations from the
/// <see cref="OperatingPoint"/> (the document's, in engineering units, shifted by it).
/// </summary>
internal sealed record ValidatedModel(
    ModelDocument Document,
    Matrix<double> A,
    Matrix<double> B,
    Matrix<double> C,
    bool OutputIsState,
    double SampleTime,
    TimeDomain TimeDomain,
    int Horizon,
    Matrix<double> OutputWeight,
    Matrix<double> InputWeight,
    Matrix<double> InputRateWeight,
    TerminalWeightKind TerminalKind,
    Matrix<double>? TerminalMatrix,
    ValidatedLimits Limits,
    OperatingPoint OperatingPoint)
{
    public int StateCount => A.RowCount;

    public int InputCount => B.ColumnCount;

    public int OutputCount => C.RowCount;

    /// <summary>E (n×q, in the document's time domain); n×0 without measured disturbances.</summary>
    public Matrix<double> E { get; init; } = Matrix<double>.Build.Dense(A.RowCount, 0);

    public int DisturbanceCount => E.ColumnCount;
}

/// <summary>Limits with unbounded entries as ±∞, so the solver needs no null checks.</summary>
internal sealed record ValidatedLimits(
    double[] InputMin,
    double[] InputMax,
    double[] InputRateMin,
    double[] InputRateMax,
    double[] OutputMin,
    double[] OutputMax,
    double[] OutputViolationWeight)
{
    public bool HasInputBounds => InputMin.Any(double.IsFinite) || InputMax.Any(double.IsFinite);

    /// <summary>Input and output limits as deviations from <paramref name="point"/>; rate limits are differences and stay.</summary>
    public ValidatedLimits InDeviations(OperatingPoint point) => point.IsOrigin ? this : this with
    {
        InputMin = Shift(InputMin, point.Input),
        InputMax = Shift(InputMax, point.Input),
        OutputMin = Shift(OutputMin, point.Output),
        OutputMax = Shift(OutputMax, point.Output),
    };

    private static double[] Shift(double[] bounds, double[] offset)
    {
        var shifted = new double[bounds.Length];
        for (int i = 0; i < bounds.Length; i++)
        {
            // ±∞ (unbounded) stays unbounded.
            shifted[i] = double.IsFinite(bounds[i]) ? bounds[i] - offset[i] : bounds[i];
        }

        return shifted;
    }

    public bool HasRateBounds => InputRateMin.Any(double.IsFinite) || InputRateMax.Any(double.IsFinite);

    public bool HasOutputBounds => OutputMin.Any(double.IsFinite) || OutputMax.Any(double.IsFinite);

    public bool Any => HasInputBounds || HasRateBounds || HasOutputBounds;
}
