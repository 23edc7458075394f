using Lookahead.Core.Estimation;
using Lookahead.Core.Tests.Support;
using Lookahead.Core.Validation;
using MathNet.Numerics.LinearAlgebra;
using Xunit;

namespace Lookahead.Core.Tests.Estimation;

public class EstimatorBehaviourTests
{
    public static IEnumerable<object[]> OffsetFreeCases =>
        Fixtures.Load(EstimatorFixtureCase.File).GetProperty("cases").EnumerateArray()
            .Where(c => c.GetProperty("disturbanceModel").GetString() != "none")
            .Select(c => new object[] { c.GetProperty("name").GetString()! });

    /// <summary>B_d and C_d written out by hand from the definitions (independent of the code under test).</summary>
    private static (double[,] Bd, double[,] Cd) DisturbanceMaps(string model, double[][] b, int p)
    {
        int n = b.Length;
        int m = b[0].Length;
        if (model == "output")
        {
            var cd = new double[p, p];
            for (int i = 0; i < p; i++)
            {
                cd[i, i] = 1;
            }

            return (new double[n, p], cd);
        }

        var bd = new double[n, m];
        for (int i = 0; i < n; i++)
        {
            for (int j = 0; j < m; j++)
            {
                bd[i, j] = b[i][j];
            }
        }

        return (bd, new double[p, m]);
    }

    private static double[] Times(double[][] a, double[] x) => a.Select(row => row.Zip(x, (r, v) => r * v).Sum()).ToArray();

    private static double[] Times(double[,] a, double[] x)
    {
        var y = new double[a.GetLength(0)];
        for (int i = 0; i < y.Length; i++)
        {
            for (int j = 0; j < x.Length; j++)
            {
                y[i] += a[i, j] * x[j];
            }
        }

        return y;
    }

    private static double[] Add(params double[][] vectors) =>
        Enumerable.Range(0, vectors[0].Length).Select(i => vectors.Sum(v => v[i])).ToArray();

    private static double[] RandomVector(Random random, int length) => Enumerable.Range(0, length).Select(_ => (2 * random.NextDouble()) - 1).ToArray();

    // Source: the definition of a steady state of the augmented model (common practice): x = A x + B u + B_d d and
    // y = C x + C_d d, evaluated here with B_d, C_d written out by hand. For a design that passed the offset-free
    // test the steady-state system is square and nonsingular, so the fit must be exact to rounding.
    [Theory]
    [MemberData(nameof(OffsetFreeCases))]
    public void InitialiseReproducesTheMeasurementAtSteadyState(string name)
    {
        var c = EstimatorFixtureCase.Get(name);
        var a = c.GetProperty("a").Matrix();
        var b = c.GetProperty("b").Matrix();
        var cm = c.GetProperty("c").Matrix();
        var (bd, cd) = DisturbanceMaps(c.GetProperty("disturbanceModel").GetString()!, b, cm.Length);
        var estimator = EstimatorFixtureCase.Design(name);
        var random = new Random(4711);
        for (int trial = 0; trial < 5; trial++)
        {
            var y = RandomVector(random, cm.Length);
            var u = RandomVector(random, b[0].Length);
            var s = estimator.Initialise(y, u);
            Assertions.Close(y, Add(Times(cm, s.State), Times(cd, s.Disturbance)), 1e-9, $"{name}: C x + C_d d = y");
            Assertions.Close(s.State, Add(Times(a, s.State), Times(b, u), Times(bd, s.Disturbance)), 1e-9, $"{name}: x = A x + B u + B_d d");

            var step = estimator.Step(null, u, y);
            Assert.True(step.Initialised);
            Assertions.Close(s.State, step.Corrected.Estimate.State, 0, $"{name}: Step starts from Initialise");
            Assertions.Close(new double[y.Length], step.Corrected.Innovation!, 1e-9, $"{name}: nothing left to explain");
        }
    }

    // Source: the filter recursion x⁺ = x⁻ + L (y − C_a x⁻), x⁻' = A_a x⁺ + B_a u, written with plain loops here
    // and driven by SciPy's gain from the fixture (scipy.linalg.solve_discrete_are, SciPy 1.10.1), not Lookahead's.
    [Theory]
    [MemberData(nameof(EstimatorFixtureCase.Designed), MemberType = typeof(EstimatorFixtureCase))]
    public void CorrectAndPredictFollowAHandWrittenRecursion(string name)
    {
        var c = EstimatorFixtureCase.Get(name);
        var a = c.GetProperty("a").Matrix();
        var b = c.GetProperty("b").Matrix();
        var cm = c.GetProperty("c").Matrix();
        var l = c.GetProperty("gain").Matrix();
        string model = c.GetProperty("disturbanceModel").GetString()!;
        int n = a.Length;
        int p = cm.Length;
        int nd = l.Length - n;
        var (bd, cd) = model == "none" ? (new double[n, 0], new double[p, 0]) : DisturbanceMaps(model, b, p);
        var estimator = EstimatorFixtureCase.Design(name);
        var random = new Random(1234);
        var x = RandomVector(random, n);
        var d = RandomVector(random, nd);
        for (int k = 0; k < 20; k++)
        {
            var y = RandomVector(random, p);
            var u = RandomVector(random, b[0].Length);
            var corrected = estimator.Correct(x, d, y);

            var predicted = Add(Times(cm, x), Times(cd, d));
            var innovation = y.Zip(predicted, (yi, pi) => yi - pi).ToArray();
            var xPost = x.Select((xi, i) => xi + l[i].Zip(innovation, (g, e) => g * e).Sum()).ToArray();
            var dPost = d.Select((di, i) => di + l[n + i].Zip(innovation, (g, e) => g * e).Sum()).ToArray();
            Assertions.Close(predicted, corrected.PredictedMeasurement, 1e-9, $"{name}[{k}] C_a x⁻");
            Assertions.Close(innovation, corrected.Innovation!, 1e-9, $"{name}[{k}] innovation");
            Assertions.Close(xPost, corrected.Estimate.State, 1e-8, $"{name}[{k}] x⁺");
            Assertions.Close(dPost, corrected.Estimate.Disturbance, 1e-8, $"{name}[{k}] d⁺");

            var next = estimator.Predict(corrected.Estimate, u);
            x = Add(Times(a, xPost), Times(b, u), Times(bd, dPost));
            d = dPost;
            Assertions.Close(x, next.State, 1e-8, $"{name}[{k}] x⁻ next");
            Assertions.Close(d, next.Disturbance, 1e-8, $"{name}[{k}] d⁻ next");
            x = next.State;
            d = next.Disturbance;
        }
    }

    // Source: common practice — with the true plant inside the augmented model class, no noise and a stable
    // estimator, the prior error obeys e(k+1) = (A_a − A_a L C_a) e(k) and decays, so the predicted measurement
    // meets the measurement and d̂ meets the true constant disturbance. The plant is simulated here by hand.
    [Theory]
    [InlineData("cold-storage-n3-output-diagonal")]
    [InlineData("random-n4-output-semidefinite")]
    [InlineData("random-n3-input-full")]
    [InlineData("integrating-n2-input-diagonal")]
    public void LearnsAConstantUnmeasuredDisturbance(string name)
    {
        const int MaxSamples = 5000;
        const double Tolerance = 1e-9;
        var c = EstimatorFixtureCase.Get(name);
        var a = c.GetProperty("a").Matrix();
        var b = c.GetProperty("b").Matrix();
        var cm = c.GetProperty("c").Matrix();
        string model = c.GetProperty("disturbanceModel").GetString()!;
        var (bd, cd) = DisturbanceMaps(model, b, cm.Length);
        var estimator = EstimatorFixtureCase.Design(name);
        var random = new Random(99);
        var trueDisturbance = RandomVector(random, estimator.DisturbanceCount).Select(v => 3 * v).ToArray();
        var input = RandomVector(random, b[0].Length);
        var trueState = new double[a.Length];
        StateEstimate? estimate = new(new double[a.Length], new double[estimator.DisturbanceCount]);
        int converged = -1;
        double lastInnovation = double.NaN;
        for (int k = 0; k < MaxSamples && converged < 0; k++)
        {
            var y = Add(Times(cm, trueState), Times(cd, trueDisturbance));
            var step = estimator.Step(estimate, input, y);
            double scale = Math.Max(1, y.Max(Math.Abs));
            lastInnovation = step.Corrected.Innovation!.Max(Math.Abs) / scale;
            if (lastInnovation <= Tolerance && step.Corrected.Estimate.Disturbance.Zip(trueDisturbance, (e, t) => Math.Abs(e - t)).Max() <= Tolerance * 3)
            {
                converged = k;
            }

            trueState = Add(Times(a, trueState), Times(b, input), Times(bd, trueDisturbance));
            estimate = step.NextPrior;
        }

        Assert.True(converged >= 0, $"{name}: innovation still {lastInnovation:g3} of the measurement after {MaxSamples} samples");
        Assert.True(converged > 0, $"{name}: converged at once, so the check would not see a wrong gain");
    }

    // Source: definition of the missing-measurement convention (this project's): the prior is passed on uncorrected.
    [Fact]
    public void MissingMeasurementPassesThePriorOnAndSaysSo()
    {
        var estimator = EstimatorFixtureCase.Design("random-n4-output-semidefinite");
        var prior = new StateEstimate([0.1, -0.2, 0.3, 0.4], [1, 2, 3]);
        var corrected = estimator.Correct(prior, null);
        Assert.False(corrected.MeasurementUsed);
        Assert.Null(corrected.Innovation);
        Assert.Equal(prior.State, corrected.Estimate.State);
        Assert.Equal(prior.Disturbance, corrected.Estimate.Disturbance);

        var withMeasurement = estimator.Correct(prior, [0, 0, 0]);
        Assert.True(withMeasurement.MeasurementUsed);
        Assert.NotEqual(prior.State, withMeasurement.Estimate.State);
    }

    [Fact]
    public void StepWithoutEstimateOrMeasurementIsRefused()
    {
        var estimator = EstimatorFixtureCase.Design("random-n2-output-diagonal");
        var ex = Assert.Throws<ModelValidationException>(() => estimator.Step(null, [0.0], null));
        Assert.Equal("measurement", Assert.Single(ex.Errors).Path);
    }

    [Fact]
    public void WrongVectorsNameTheirPath()
    {
        var estimator = EstimatorFixtureCase.Design("random-n3-input-full");
        var good = new StateEstimate([0, 0, 0], [0, 0]);
        Assert.Equal("estimate.state", Assert.Throws<ModelValidationException>(() => estimator.Correct([0, 0], [0, 0], [1, 1])).Errors[0].Path);
        Assert.Equal("estimate.disturbance", Assert.Throws<ModelValidationException>(() => estimator.Correct([0, 0, 0], [0], [1, 1])).Errors[0].Path);
        Assert.Equal("measurement", Assert.Throws<ModelValidationException>(() => estimator.Correct(good, [1, 1, 1])).Errors[0].Path);
        Assert.Equal("measurement[1]", Assert.Throws<ModelValidationException>(() => estimator.Correct(good, [1, double.NaN])).Errors[0].Path);
        Assert.Equal("appliedInput", Assert.Throws<ModelValidationException>(() => estimator.Predict(good, [1])).Errors[0].Path);
    }

    [Fact]
    public void ReturnedMatricesAreCopies()
    {
        var estimator = EstimatorFixtureCase.Design("random-n2-output-diagonal");
        var gain = estimator.Gain;
        double before = gain[0, 0];
        gain[0, 0] = 1e6;
        Assert.Equal(before, estimator.Gain[0, 0]);
        var covariance = estimator.Covariance;
        covariance.Clear();
        Assert.NotEqual(0, estimator.Covariance[0, 0]);
    }

    [Fact]
    public void NoneModelHasNoDisturbances()
    {
        var estimator = EstimatorFixtureCase.Design("random-n5-none-full");
        Assert.Equal(0, estimator.DisturbanceCount);
        Assert.Equal(5, estimator.AugmentedA.RowCount);
        var step = estimator.Step(new StateEstimate(new double[5], []), [1, 0], [0.5, -0.5]);
        Assert.Empty(step.NextPrior.Disturbance);
        Assert.True(Matrix<double>.Build.DenseOfColumnArrays(step.NextPrior.State).Enumerate().All(double.IsFinite));
    }
}
