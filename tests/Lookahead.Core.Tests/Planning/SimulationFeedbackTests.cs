using Lookahead.Core.Estimation;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Lookahead.Core.Validation;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

/// <summary>
/// The closed-loop simulator with measured and unmeasured disturbances, measurements, noise and feedback from the
/// model's estimator.
/// </summary>
public class SimulationFeedbackTests
{
    private const int Steps = 500;
    private const int LoadStep = 100;

    /// <summary>
    /// Offset-free control in simulation (Pannocchia &amp; Rawlings, AIChE J. 49(2), 2003; Muske &amp; Badgwell,
    /// J. Process Control 12, 2002): with an output-disturbance estimator and the plan's target held against d̂, a
    /// settled loop has no steady offset despite a 20 % gain mismatch and a step output disturbance the model does not
    /// know; planning from the true state without the estimator leaves one. Random stable plants in engineering units
    /// (a random operating point), so the run's unit conversion is exercised too.
    /// </summary>
    [Theory]
    [InlineData(11)]
    [InlineData(12)]
    [InlineData(13)]
    public void FeedbackFromTheEstimateRemovesTheOffsetAndFeedbackFromTheStateLeavesOne(int seed)
    {
        var random = new Random(seed);
        const int n = 3, m = 2, p = 2;
        var (a, b) = TestModels.Random(random, n, m, 0.7);
        var c = Enumerable.Range(0, p).Select(_ => TestModels.RandomVector(random, n)).ToArray();
        var point = new OperatingPointSpec(TestModels.RandomVector(random, n, 20), TestModels.RandomVector(random, m, 50), TestModels.RandomVector(random, p, 20));
        var estimator = new EstimatorSpec(WeightSpec.FromDiagonal([.. Enumerable.Repeat(1e-4, n), .. Enumerable.Repeat(1e-2, p)]), WeightSpec.FromDiagonal([1e-3, 1e-3]), DisturbanceModelKind.Output);
        var document = TestModels.Discrete(a, b, 15, [1.0, 1.0], [0.1, 0.1], TerminalWeightSpec.Riccati, c) with { Estimator = estimator, OperatingPoint = point };
        var model = ModelCompiler.Compile(document);

        // The true plant: every input 20 % stronger than modelled; from LoadStep on, a step load on the outputs.
        var truePlant = new PlantSpec(a, b.Select(row => row.Select(v => 1.2 * v).ToArray()).ToArray(), null, 1.0);
        var offset = TestModels.RandomVector(random, p, 0.5);
        var reference = point.Output!.Zip(TestModels.RandomVector(random, p, 1.0), (y0, r) => y0 + r).ToArray();
        var request = new SimulationRequest(
            point.State!,
            Steps,
            [new ReferenceChange(0, reference)],
            truePlant,
            PreviousInput: point.Input,
            OutputDisturbance: [new OutputDisturbanceChange(LoadStep, offset)]);

        var fromEstimate = ClosedLoopSimulator.Simulate(model, request with { Feedback = SimulationFeedback.Estimate });
        var fromState = ClosedLoopSimulator.Simulate(model, request);

        double scale = Math.Max(1, reference.Max(Math.Abs));
        double estimateOffset = Offset(fromEstimate.Outputs[^1], reference);
        double stateOffset = Offset(fromState.Outputs[^1], reference);
        Assert.True(estimateOffset <= 1e-6 * scale, $"seed {seed}: with feedback from the estimate the output settles {estimateOffset:g3} from the setpoint");
        Assert.True(stateOffset >= 1e-3 * scale, $"seed {seed}: with feedback from the state the offset is only {stateOffset:g3}; the case does not test offset removal");

        // The outputs carry the load: C x_T + o (engineering units) — the load is on the true outputs, not only the reading.
        var x = fromEstimate.States[^1].Zip(point.State!, (v, x0) => v - x0).ToArray();
        var cx = c.Select((row, j) => row.Select((v, i) => v * x[i]).Sum() + point.Output![j] + offset[j]).ToArray();
        Assertions.Close(cx, fromEstimate.Outputs[^1], 1e-9, "y_T");

        // Without noise the sensors read the true outputs, and the estimator's picture of them converges to it.
        Assertions.Close(fromEstimate.Outputs, fromEstimate.Measurements!, 0, "measurements");
        Assertions.Close(fromEstimate.Outputs[^1], fromEstimate.EstimatedOutputs![^1], 1e-6, "estimated y_T");
        Assert.Equal(Steps + 1, fromEstimate.Estimates!.Length);
        Assert.Equal(Steps + 1, fromEstimate.DisturbanceEstimates!.Length);
        Assert.Null(fromState.Estimates);
    }

    /// <summary>
    /// A measured disturbance drives the true plant through E and is held by each plan: the run with feedback from the
    /// state equals a loop written here from the model's public plan and the plant equation x⁺ = A x + B u + E v
    /// (common practice: the receding-horizon loop, applied by hand).
    /// </summary>
    [Fact]
    public void AMeasuredDisturbanceDrivesThePlantAndIsHeldByEachPlan()
    {
        double[][] a = [[0.95, 0.02], [0.03, 0.9]];
        double[][] b = [[-0.05, 0.0], [0.0, -0.04]];
        double[][] e = [[0.01], [0.02]];
        var document = new ModelDocument(
            "two-zones-outdoor",
            new PlantSpec(a, b, null, 60, TimeDomain.Discrete, e),
            new CostSpec(8, WeightSpec.FromDiagonal([1.0, 1.0]), WeightSpec.FromDiagonal([0.01, 0.01])),
            new LimitsSpec([-5.0, -5.0], [5.0, 5.0]),
            OperatingPoint: new OperatingPointSpec([2.0, 3.0], [1.0, 1.0], [2.0, 3.0], [15.0]));
        var model = ModelCompiler.Compile(document);
        const int steps = 30;
        double[] reference = [1.0, 2.5];
        var schedule = new List<MeasuredDisturbanceChange> { new(5, [25.0]), new(15, [5.0]) };
        var result = ClosedLoopSimulator.Simulate(model, new SimulationRequest([2.0, 3.0], steps, [new ReferenceChange(0, reference)], PreviousInput: [1.0, 1.0], MeasuredDisturbances: schedule));

        // The loop by hand, in engineering units; before step 5 nothing is measured (v = v_op, zero deviation).
        double[] x = [2.0, 3.0];
        double[] previous = [1.0, 1.0];
        for (int k = 0; k < steps; k++)
        {
            double? v = k >= 15 ? 5.0 : k >= 5 ? 25.0 : null;
            var plan = model.Plan(new PlanRequest(x, reference, previous, Disturbance: v is null ? null : [[v.Value]]));
            var u = plan.Input(0).ToArray();
            Assertions.Close(u, result.Inputs[k], 1e-9, $"u_{k}");
            double dv = (v ?? 15.0) - 15.0;
            double[] dx = [x[0] - 2.0, x[1] - 3.0];
            double[] du = [u[0] - 1.0, u[1] - 1.0];
            x =
            [
                2.0 + (a[0][0] * dx[0]) + (a[0][1] * dx[1]) + (b[0][0] * du[0]) + (b[0][1] * du[1]) + (e[0][0] * dv),
                3.0 + (a[1][0] * dx[0]) + (a[1][1] * dx[1]) + (b[1][0] * du[0]) + (b[1][1] * du[1]) + (e[1][0] * dv),
            ];
            Assertions.Close(x, result.States[k + 1], 1e-9, $"x_{k + 1}");
            previous = u;
        }

        // Each step's reference row reads as given, in engineering units, however many steps share it.
        Assert.All(result.References!, r => Assertions.Close(reference, r, 1e-12, "reference"));

        // The disturbance mattered: without it the run is different.
        var undisturbed = ClosedLoopSimulator.Simulate(model, new SimulationRequest([2.0, 3.0], steps, [new ReferenceChange(0, reference)], PreviousInput: [1.0, 1.0]));
        Assert.True(Math.Abs(undisturbed.Inputs[10][0] - result.Inputs[10][0]) > 1e-3, "the measured disturbance should change the moves");
    }

    /// <summary>
    /// Seeded noise: the same seed gives the same run, another seed or none a different one; the noise added to the
    /// measurements has the requested standard deviation per output and zero mean (Box–Muller gives independent
    /// standard normals; common practice: sample mean within 4 σ/√N, sample deviation within 5 %).
    /// </summary>
    [Fact]
    public void SeededMeasurementNoiseIsReproducibleAndHasTheRequestedSpread()
    {
        var model = EstimatedTwoZones();
        double[] sigma = [0.05, 0.2];
        var request = new SimulationRequest([0.0, 0.0], 2000, [new ReferenceChange(0, [0.5, -0.5])], Feedback: SimulationFeedback.Estimate, MeasurementNoise: new MeasurementNoise(sigma, 42));

        var first = ClosedLoopSimulator.Simulate(model, request);
        var again = ClosedLoopSimulator.Simulate(model, request);
        var otherSeed = ClosedLoopSimulator.Simulate(model, request with { MeasurementNoise = new MeasurementNoise(sigma, 43) });
        var noiseless = ClosedLoopSimulator.Simulate(model, request with { MeasurementNoise = null });

        Assert.Equal(first.Measurements!.Flatten(), again.Measurements!.Flatten());
        Assert.Equal(first.Inputs.Flatten(), again.Inputs.Flatten());
        Assert.Equal(first.States.Flatten(), again.States.Flatten());
        Assert.NotEqual(first.Inputs.Flatten(), otherSeed.Inputs.Flatten());
        Assert.True(Math.Abs(first.Inputs[5][0] - noiseless.Inputs[5][0]) > 1e-6, "noise on the measurements should move the plans made from the estimate");

        for (int j = 0; j < sigma.Length; j++)
        {
            var noise = first.Measurements!.Zip(first.Outputs, (y, t) => y[j] - t[j]).ToArray();
            double mean = noise.Average();
            double deviation = Math.Sqrt(noise.Select(v => (v - mean) * (v - mean)).Sum() / (noise.Length - 1));
            Assert.True(Math.Abs(mean) <= 4 * sigma[j] / Math.Sqrt(noise.Length), $"output {j}: mean {mean:g3}");
            Assert.InRange(deviation, 0.95 * sigma[j], 1.05 * sigma[j]);
        }

        // With feedback from the state the noise is only read, never used: the moves are the noiseless ones.
        var stateFed = ClosedLoopSimulator.Simulate(model, request with { Feedback = SimulationFeedback.State });
        var stateFedNoiseless = ClosedLoopSimulator.Simulate(model, request with { Feedback = SimulationFeedback.State, MeasurementNoise = null });
        Assert.Equal(stateFedNoiseless.Inputs.Flatten(), stateFed.Inputs.Flatten());
        Assert.NotEqual(stateFed.Outputs.Flatten(), stateFed.Measurements!.Flatten());
    }

    [Fact]
    public void RefusesBadFeedbackDisturbanceAndNoiseFieldsWithPaths()
    {
        var plain = ModelCompiler.Compile(TestModels.Discrete([[0.9, 0.0], [0.0, 0.8]], [[1.0], [0.5]], 5, [1.0, 1.0], [0.1]));
        var ex = Assert.Throws<ModelValidationException>(() => ClosedLoopSimulator.Simulate(plain, new SimulationRequest(
            [0.0, 0.0],
            10,
            MeasuredDisturbances: [new MeasuredDisturbanceChange(0, [1.0])],
            OutputDisturbance: [new OutputDisturbanceChange(0, [1.0]), new OutputDisturbanceChange(0, [1.0, 2.0])],
            Feedback: SimulationFeedback.Estimate,
            MeasurementNoise: new MeasurementNoise([0.1, -0.1]))));
        var paths = ex.Errors.Select(e => e.Path).ToList();
        Assert.Contains("feedback", paths);
        Assert.Contains("measuredDisturbances", paths);
        Assert.Contains("outputDisturbance[0].offset", paths);
        Assert.Contains("outputDisturbance[1].fromStep", paths);
        Assert.Contains("measurementNoise.standardDeviation[1]", paths);
        Assert.DoesNotContain("measurementNoise.standardDeviation[0]", paths);

        var withE = ModelCompiler.Compile(TestModels.Discrete([[0.9, 0.0], [0.0, 0.8]], [[1.0], [0.5]], 5, [1.0, 1.0], [0.1]) with
        {
            Plant = new PlantSpec([[0.9, 0.0], [0.0, 0.8]], [[1.0], [0.5]], null, 1.0, TimeDomain.Discrete, [[0.1], [0.2]]),
        });
        ex = Assert.Throws<ModelValidationException>(() => ClosedLoopSimulator.Simulate(withE, new SimulationRequest(
            [0.0, 0.0],
            3,
            MeasuredDisturbances: [new MeasuredDisturbanceChange(0, [1.0, 2.0]), new MeasuredDisturbanceChange(1, [double.NaN])],
            OutputDisturbance: [new(0, [0.0, 0.0]), new(1, [0.0, 0.0]), new(2, [0.0, 0.0]), new(3, [0.0, 0.0])],
            MeasurementNoise: new MeasurementNoise([0.1]))));
        paths = ex.Errors.Select(e => e.Path).ToList();
        Assert.Contains("measuredDisturbances[0].disturbance", paths);
        Assert.Contains("measuredDisturbances[1].disturbance", paths);
        Assert.Contains("outputDisturbance", paths);
        Assert.Contains("measurementNoise.standardDeviation", paths);
    }

    /// <summary>Two zones with an output-disturbance estimator (invented numbers).</summary>
    private static CompiledModel EstimatedTwoZones() => ModelCompiler.Compile(
        TestModels.Discrete([[0.9, 0.05], [0.04, 0.85]], [[0.1, 0.0], [0.02, 0.08]], 15, [1.0, 1.0], [0.05, 0.05]) with
        {
            Estimator = new EstimatorSpec(WeightSpec.FromDiagonal([1e-4, 1e-4, 1e-2, 1e-2]), WeightSpec.FromDiagonal([1e-3, 1e-3])),
        });

    private static double Offset(double[] outputs, double[] reference) => outputs.Zip(reference, (y, r) => Math.Abs(y - r)).Max();
}
