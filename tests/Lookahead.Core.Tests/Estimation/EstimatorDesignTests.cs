using System.Numerics;
using Lookahead.Core.Estimation;
using Lookahead.Core.Tests.Numerics;
using Lookahead.Core.Tests.Support;
using Lookahead.Core.Validation;
using Xunit;

namespace Lookahead.Core.Tests.Estimation;

// Every expected number below comes from tests/reference/generate_estimators.py (SciPy 1.10.1, NumPy 1.24.2, the
// "source" field of Fixtures/estimators.json), not from Lookahead.
public class EstimatorDesignTests
{
    private const double Relative = 1e-8;

    // Source: scipy.linalg.solve_discrete_are(A_a.T, C_a.T, W, V) (SciPy 1.10.1) — the prior error covariance.
    [Theory]
    [MemberData(nameof(EstimatorFixtureCase.Designed), MemberType = typeof(EstimatorFixtureCase))]
    public void CovarianceMatchesScipy(string name)
    {
        var c = EstimatorFixtureCase.Get(name);
        var estimator = Bounded.Run(() => EstimatorFixtureCase.Design(name));
        Assertions.Close(c.GetProperty("p").Matrix(), estimator.Covariance, Relative, $"{name} P");
    }

    // Source: L = P C_a' (C_a P C_a' + V)^-1 and A_a L from numpy.linalg.solve on SciPy's P (NumPy 1.24.2).
    [Theory]
    [MemberData(nameof(EstimatorFixtureCase.Designed), MemberType = typeof(EstimatorFixtureCase))]
    public void GainsMatchScipy(string name)
    {
        var c = EstimatorFixtureCase.Get(name);
        var estimator = Bounded.Run(() => EstimatorFixtureCase.Design(name));
        Assertions.Close(c.GetProperty("gain").Matrix(), estimator.Gain, Relative, $"{name} L");
        Assertions.Close(c.GetProperty("predictorGain").Matrix(), estimator.PredictorGain, Relative, $"{name} A_a L");
        Assert.Equal(estimator.StateCount + estimator.DisturbanceCount, estimator.Gain.RowCount);
        Assert.Equal(estimator.OutputCount, estimator.Gain.ColumnCount);
    }

    // Source: numpy.linalg.eigvals(A_a − A_a L C_a) (NumPy 1.24.2), compared as multisets (nearest unmatched pair).
    [Theory]
    [MemberData(nameof(EstimatorFixtureCase.Designed), MemberType = typeof(EstimatorFixtureCase))]
    public void EigenvaluesMatchNumpy(string name)
    {
        var c = EstimatorFixtureCase.Get(name);
        var expected = c.GetProperty("eigenvalues").Matrix().Select(z => new Complex(z[0], z[1])).ToList();
        var estimator = Bounded.Run(() => EstimatorFixtureCase.Design(name));
        var actual = estimator.Eigenvalues.ToList();
        Assert.Equal(expected.Count, actual.Count);
        foreach (var e in expected)
        {
            var nearest = actual.OrderBy(z => (z - e).Magnitude).First();
            // Eigenvalues of a non-normal matrix are less well conditioned than its entries: 1e-7 relative.
            Assert.True((nearest - e).Magnitude <= 1e-7 * Math.Max(1, e.Magnitude), $"{name}: expected eigenvalue {e}, nearest {nearest}");
            actual.Remove(nearest);
        }

        Assertions.CloseScalar(c.GetProperty("spectralRadius").GetDouble(), estimator.SpectralRadius, 1e-7, $"{name} spectral radius");
    }

    // Source: the refusal reason of each case is established in tests/reference/generate_estimators.py with
    // numpy.linalg.matrix_rank (NumPy 1.24.2): the offset-free rank, the disturbance count against p, the Hautus
    // rank at the witness eigenvalue, or rank [A_a − λI, W] on the unit circle.
    [Theory]
    [MemberData(nameof(EstimatorFixtureCase.Refused), MemberType = typeof(EstimatorFixtureCase))]
    public void RefusesWithThePathAndReason(string name)
    {
        var c = EstimatorFixtureCase.GetRefused(name);
        var (a, b, cm, spec) = EstimatorFixtureCase.Plant(c);
        var ex = Assert.Throws<ModelValidationException>(() => Bounded.Run(() => EstimatorDesign.Build(a, b, cm, spec)));
        var error = Assert.Single(ex.Errors);
        Assert.Equal(c.GetProperty("path").GetString(), error.Path);
        string reason = error.Reason;
        switch (c.GetProperty("reason").GetString())
        {
            case "rank-deficient":
                int rank = c.GetProperty("rank").GetInt32();
                int required = c.GetProperty("required").GetInt32();
                int rankAMinusI = c.GetProperty("rankAMinusI").GetInt32();
                Assert.Contains($"= n + n_d = {required}, but its rank is {rank}", reason);
                if (rankAMinusI < a.RowCount)
                {
                    Assert.Contains($"A − I is singular (rank {rankAMinusI} of {a.RowCount})", reason);
                    Assert.Contains("integrator", reason);
                }
                else
                {
                    Assert.Contains("steady-state gain", reason);
                }

                break;
            case "more-disturbances-than-outputs":
                Assert.Contains($"({c.GetProperty("disturbances").GetInt32()}) but the plant has only {c.GetProperty("outputs").GetInt32()} output", reason);
                break;
            case "fewer-disturbances-than-outputs":
                Assert.Contains($"{c.GetProperty("disturbances").GetInt32()} input disturbance", reason);
                Assert.Contains($"each of the {c.GetProperty("outputs").GetInt32()} outputs", reason);
                break;
            case "undetectable":
                Assert.Contains("not detectable", reason);
                Assert.Contains($"λ = {c.GetProperty("witness").GetDouble():g6}", reason);
                break;
            case "noise-misses-unit-circle-mode":
                Assert.Contains("drives no part of the mode", reason);
                Assert.Contains($"λ = {c.GetProperty("witness").GetDouble():g6}", reason);
                break;
            default:
                Assert.Fail($"unknown reason {c.GetProperty("reason").GetString()}");
                break;
        }
    }

    // Source: numpy.linalg.lstsq(rcond=None) (NumPy 1.24.2), the minimum-norm least-squares solution of
    // [[I − A, −B_d], [C, C_d]] [x; d] = [B u; y].
    [Theory]
    [MemberData(nameof(EstimatorFixtureCase.Designed), MemberType = typeof(EstimatorFixtureCase))]
    public void InitialiseMatchesNumpyLeastSquares(string name)
    {
        var init = EstimatorFixtureCase.Get(name).GetProperty("initialise");
        var estimator = EstimatorFixtureCase.Design(name);
        var estimate = estimator.Initialise(init.GetProperty("measurement").Vector(), init.GetProperty("input").Vector());
        Assertions.Close(init.GetProperty("state").Vector(), estimate.State, Relative, $"{name} x");
        Assertions.Close(init.GetProperty("disturbance").Vector(), estimate.Disturbance, Relative, $"{name} d");
    }

    // Source: the filter recursion run in numpy with SciPy's gain (generate_estimators.py "trajectory"):
    // x⁺(k) = x⁻(k) + L (y(k) − C_a x⁻(k)), skipped when y(k) is null; x⁻(k+1) = A_a x⁺(k) + B_a u(k).
    [Theory]
    [MemberData(nameof(EstimatorFixtureCase.Designed), MemberType = typeof(EstimatorFixtureCase))]
    public void StepFollowsTheNumpyRecursion(string name)
    {
        var t = EstimatorFixtureCase.Get(name).GetProperty("trajectory");
        var estimator = EstimatorFixtureCase.Design(name);
        var prior = t.GetProperty("prior");
        var estimate = new StateEstimate(prior.GetProperty("state").Vector(), prior.GetProperty("disturbance").Vector());
        var inputs = t.GetProperty("inputs").Matrix();
        var measurements = t.GetProperty("measurements").EnumerateArray().Select(m => m.ValueKind == System.Text.Json.JsonValueKind.Null ? null : m.Vector()).ToArray();
        var corrected = t.GetProperty("corrected").Matrix();
        var priors = t.GetProperty("nextPriors").Matrix();
        for (int k = 0; k < inputs.Length; k++)
        {
            var step = estimator.Step(estimate, inputs[k], measurements[k]);
            Assert.False(step.Initialised);
            Assert.Equal(measurements[k] is not null, step.Corrected.MeasurementUsed);
            Assert.Equal(measurements[k] is null, step.Corrected.Innovation is null);
            Assertions.Close(corrected[k], [.. step.Corrected.Estimate.State, .. step.Corrected.Estimate.Disturbance], Relative, $"{name} corrected[{k}]");
            Assertions.Close(priors[k], [.. step.NextPrior.State, .. step.NextPrior.Disturbance], Relative, $"{name} next prior[{k}]");
            estimate = step.NextPrior;
        }
    }
}
