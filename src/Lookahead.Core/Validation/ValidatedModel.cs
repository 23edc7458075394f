using Lookahead.Core.Models;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Validation;

/// <summary>
/// A model whose shapes, numbers and definiteness have been checked, as dense matrices.
/// A and B are still in the document's time domain; weights are symmetrised.
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
    ValidatedLimits Limits)
{
    public int StateCount => A.RowCount;

    public int InputCount => B.ColumnCount;

    public int OutputCount => C.RowCount;
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

    public bool HasRateBounds => InputRateMin.Any(double.IsFinite) || InputRateMax.Any(double.IsFinite);

    public bool HasOutputBounds => OutputMin.Any(double.IsFinite) || OutputMax.Any(double.IsFinite);

    public bool Any => HasInputBounds || HasRateBounds || HasOutputBounds;
}
