using Lookahead.Core.Estimation;
using Lookahead.Core.Models;
using Lookahead.Core.Validation;
using MathNet.Numerics.LinearAlgebra;
using Xunit;

namespace Lookahead.Core.Tests.Estimation;

// The facts checked here are definitions (common practice): a covariance is symmetric positive semidefinite, a
// measurement covariance used to form (C P Cᵀ + V)⁻¹ must be positive definite, diag(1, −1) is indefinite.
public class EstimatorSpecValidationTests
{
    // Stable 2-state, 1-input, 1-output plant: n + n_d = 3 for the output model.
    private static readonly Matrix<double> A = Matrix<double>.Build.DenseOfArray(new[,] { { 0.5, 0.1 }, { 0.0, 0.7 } });
    private static readonly Matrix<double> B = Matrix<double>.Build.DenseOfArray(new[,] { { 0.0 }, { 1.0 } });
    private static readonly Matrix<double> C = Matrix<double>.Build.DenseOfArray(new[,] { { 1.0, 0.0 } });

    private static ValidationError Refusal(EstimatorSpec spec)
    {
        var ex = Assert.Throws<ModelValidationException>(() => EstimatorDesign.Build(A, B, C, spec));
        return Assert.Single(ex.Errors);
    }

    [Fact]
    public void ProcessNoiseVectorOfWrongLengthIsRefused()
    {
        var error = Refusal(new EstimatorSpec(WeightSpec.FromDiagonal([1, 1]), WeightSpec.FromDiagonal([1])));
        Assert.Equal("estimator.processNoise", error.Path);
        Assert.Contains("has 2 diagonal entries; expected n + n_d = 2 + 1 = 3", error.Reason);
    }

    [Fact]
    public void ProcessNoiseMatrixOfWrongShapeIsRefused()
    {
        var error = Refusal(new EstimatorSpec(WeightSpec.FromMatrix([[1, 0, 0], [0, 1, 0], [0, 0]]), WeightSpec.FromDiagonal([1])));
        Assert.Equal("estimator.processNoise[2]", error.Path);
    }

    [Fact]
    public void IndefiniteProcessNoiseIsRefused()
    {
        var error = Refusal(new EstimatorSpec(WeightSpec.FromMatrix([[1, 0, 0], [0, -1, 0], [0, 0, 1]]), WeightSpec.FromDiagonal([1])));
        Assert.Equal("estimator.processNoise", error.Path);
        Assert.Contains("positive semidefinite", error.Reason);
        Assert.Contains("relative to the matrix's own scale", error.Reason);
    }

    [Fact]
    public void AsymmetricProcessNoiseIsRefused()
    {
        var error = Refusal(new EstimatorSpec(WeightSpec.FromMatrix([[1, 0.5, 0], [0, 1, 0], [0, 0, 1]]), WeightSpec.FromDiagonal([1])));
        Assert.Equal("estimator.processNoise", error.Path);
        Assert.Contains("symmetric", error.Reason);
    }

    // Semidefiniteness is relative: the same pattern at a scale of 1e-30 is still indefinite, and a semidefinite
    // matrix at that scale is accepted (an absolute threshold would accept the first or refuse neither).
    [Fact]
    public void DefinitenessIsJudgedAgainstTheMatrixsOwnScale()
    {
        const double s = 1e-30;
        var tinyIndefinite = Refusal(new EstimatorSpec(WeightSpec.FromDiagonal([s, -s, s]), WeightSpec.FromDiagonal([1])));
        Assert.Equal("estimator.processNoise", tinyIndefinite.Path);
        var estimator = EstimatorDesign.Build(A, B, C, new EstimatorSpec(WeightSpec.FromDiagonal([s, s, s]), WeightSpec.FromDiagonal([s * 0.1])));
        Assert.True(estimator.SpectralRadius < 1);
    }

    [Fact]
    public void ZeroMeasurementNoiseIsRefused()
    {
        var error = Refusal(new EstimatorSpec(WeightSpec.FromDiagonal([1, 1, 1]), WeightSpec.FromDiagonal([0])));
        Assert.Equal("estimator.measurementNoise", error.Path);
        Assert.Contains("positive definite", error.Reason);
    }

    [Fact]
    public void MeasurementNoiseOfWrongSizeIsRefused()
    {
        var error = Refusal(new EstimatorSpec(WeightSpec.FromDiagonal([1, 1, 1]), WeightSpec.FromMatrix([[1, 0], [0, 1]])));
        Assert.Equal("estimator.measurementNoise", error.Path);
    }

    [Fact]
    public void NonFiniteEntriesAreNamed()
    {
        var error = Refusal(new EstimatorSpec(WeightSpec.FromDiagonal([1, double.NaN, 1]), WeightSpec.FromDiagonal([1])));
        Assert.Equal("estimator.processNoise[1]", error.Path);
    }

    [Fact]
    public void UndefinedDisturbanceModelIsRefused()
    {
        var error = Refusal(new EstimatorSpec(WeightSpec.FromDiagonal([1, 1, 1]), WeightSpec.FromDiagonal([1]), (DisturbanceModelKind)7));
        Assert.Equal("estimator.disturbanceModel", error.Path);
    }

    [Fact]
    public void ValidateReportsEveryProblem()
    {
        var errors = EstimatorSpecValidator.Validate(new EstimatorSpec(WeightSpec.FromDiagonal([1]), null), states: 2, inputs: 1, outputs: 1);
        Assert.Equal(["estimator.processNoise", "estimator.measurementNoise"], errors.Select(e => e.Path));
    }
}
