using FsCheck.Xunit;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Lookahead.Core.Validation;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

/// <summary>
/// A model with an operating point answers in engineering units: its plan for x, r and u_{−1} in engineering units
/// equals the plan of the same model in deviations for x − x_op, r − y_op and u_{−1} − u_op, shifted back by the
/// operating point, with the same J — with limits given in engineering units on the one and in deviations on the
/// other (common practice: a linearised model is a model of the deviations from its operating point).
/// </summary>
public class OperatingPointTests
{
    private sealed record Pair(ModelDocument Deviations, ModelDocument Engineering, OperatingPointSpec Point, PlanRequest Request);

    private static Pair Random(int seed)
    {
        var random = new Random(seed);
        int n = random.Next(1, 6);
        int m = random.Next(1, 3);
        int p = random.Next(1, n + 1);
        int horizon = random.Next(2, 16);
        var (a, b) = TestModels.Random(random, n, m, 0.6 + (random.NextDouble() * 0.8));
        var c = Enumerable.Range(0, p).Select(_ => TestModels.RandomVector(random, n)).ToArray();
        double[] q = Enumerable.Range(0, p).Select(_ => 0.2 + random.NextDouble()).ToArray();
        double[] r = Enumerable.Range(0, m).Select(_ => 0.05 + random.NextDouble()).ToArray();
        double?[] Bound(int size, double sign) => Enumerable.Range(0, size).Select(_ => random.Next(4) == 0 ? (double?)null : sign * (0.2 + random.NextDouble())).ToArray();
        var limits = random.Next(3) == 0 ? null : new LimitsSpec(
            Bound(m, -1), Bound(m, 1), Bound(m, -1), Bound(m, 1), Bound(p, -1), Bound(p, 1),
            Enumerable.Range(0, p).Select(_ => 0.1 + (random.NextDouble() * 10)).ToArray());

        // Engineering values far from zero, as a cold store's −20 °C and a chiller's 60 %.
        var point = new OperatingPointSpec(
            TestModels.RandomVector(random, n, 50),
            TestModels.RandomVector(random, m, 50),
            TestModels.RandomVector(random, p, 50));
        var deviations = TestModels.Discrete(a, b, horizon, q, r, TerminalWeightSpec.Riccati, c, limits: limits);
        var engineering = deviations with { Limits = Shift(limits, point), OperatingPoint = point };
        var request = new PlanRequest(
            TestModels.RandomVector(random, n, 3),
            random.Next(2) == 0 ? null : TestModels.RandomVector(random, p, 0.5),
            random.Next(2) == 0 ? null : Enumerable.Range(0, m).Select(_ => (random.NextDouble() - 0.5) * 0.3).ToArray());
        return new Pair(deviations, engineering, point, request);
    }

    private static LimitsSpec? Shift(LimitsSpec? limits, OperatingPointSpec point) => limits is null ? null : limits with
    {
        InputMin = Add(limits.InputMin, point.Input!),
        InputMax = Add(limits.InputMax, point.Input!),
        OutputMin = Add(limits.OutputMin, point.Output!),
        OutputMax = Add(limits.OutputMax, point.Output!),
    };

    private static double?[]? Add(double?[]? bounds, double[] offset) => bounds?.Select((v, i) => v + offset[i]).ToArray();

    private static double[]? Add(double[]? values, double[] offset) => values?.Select((v, i) => v + offset[i]).ToArray();

    [Property(MaxTest = 80)]
    public void PlanInEngineeringUnitsIsTheDeviationPlanShifted(int seed)
    {
        var pair = Random(seed);
        var deviationModel = ModelCompiler.Compile(pair.Deviations);
        var engineeringModel = ModelCompiler.Compile(pair.Engineering);
        var expected = deviationModel.Plan(pair.Request);
        var engineeringRequest = new PlanRequest(
            Add(pair.Request.State, pair.Point.State!)!,
            pair.Request.Reference is null ? null : Add(pair.Request.Reference, pair.Point.Output!),
            Add(pair.Request.PreviousInput, pair.Point.Input!));

        // With no reference, both regulate to their origin: the operating point in engineering units.
        var actual = engineeringModel.Plan(engineeringRequest);
        Assert.Equal(expected.Status, actual.Status);

        // Limits and states pass through x + 50·(−1…1) and back, so agreement is to rounding at that scale.
        const double tolerance = 1e-9;
        var shift = OperatingPoint.Plus;
        for (int k = 0; k < expected.Horizon; k++)
        {
            Assertions.Close(shift(expected.Input(k).ToArray(), pair.Point.Input!), actual.Input(k).ToArray(), tolerance * 50, $"seed {seed}: u_{k}");
        }

        for (int k = 0; k <= expected.Horizon; k++)
        {
            Assertions.Close(shift(expected.State(k).ToArray(), pair.Point.State!), actual.State(k).ToArray(), tolerance * 50, $"seed {seed}: x_{k}");
            Assertions.Close(shift(expected.Output(k).ToArray(), pair.Point.Output!), actual.Output(k).ToArray(), tolerance * 50, $"seed {seed}: y_{k}");
        }

        Assertions.CloseScalar(expected.Cost, actual.Cost, 1e-7, $"seed {seed}: J");
        if (expected.Target is { } target)
        {
            Assertions.Close(shift(target.State, pair.Point.State!), actual.Target!.State, tolerance * 50, $"seed {seed}: x_s");
            Assertions.Close(shift(target.Input, pair.Point.Input!), actual.Target.Input, tolerance * 50, $"seed {seed}: u_s");
        }

        Assert.Equal(expected.ActiveLimits, actual.ActiveLimits);
    }

    [Property(MaxTest = 40)]
    public void FirstMoveInEngineeringUnitsIsTheDeviationFirstMoveShifted(int seed)
    {
        var pair = Random(seed);
        var deviationModel = ModelCompiler.Compile(pair.Deviations);
        var engineeringModel = ModelCompiler.Compile(pair.Engineering);
        var expected = new double[deviationModel.InputCount];
        var actual = new double[engineeringModel.InputCount];
        deviationModel.FirstMove(pair.Request, expected);
        engineeringModel.FirstMove(new PlanRequest(Add(pair.Request.State, pair.Point.State!)!, Add(pair.Request.Reference, pair.Point.Output!), Add(pair.Request.PreviousInput, pair.Point.Input!)), actual);
        Assertions.Close(OperatingPoint.Plus(expected, pair.Point.Input!), actual, 50e-9, $"seed {seed}: u_0");
    }

    [Fact]
    public void SimulationInEngineeringUnitsIsTheDeviationRunShifted()
    {
        var pair = Random(7);
        var deviations = ClosedLoopSimulator.Simulate(ModelCompiler.Compile(pair.Deviations), new SimulationRequest(pair.Request.State, 20));
        var engineering = ClosedLoopSimulator.Simulate(ModelCompiler.Compile(pair.Engineering), new SimulationRequest(Add(pair.Request.State, pair.Point.State!)!, 20));
        for (int k = 0; k < 20; k++)
        {
            Assertions.Close(OperatingPoint.Plus(deviations.Inputs[k], pair.Point.Input!), engineering.Inputs[k], 50e-9, $"u_{k}");
            Assertions.Close(OperatingPoint.Plus(deviations.Outputs[k], pair.Point.Output!), engineering.Outputs[k], 50e-9, $"y_{k}");
            Assertions.Close(OperatingPoint.Plus(deviations.States[k], pair.Point.State!), engineering.States[k], 50e-9, $"x_{k}");
        }

        Assertions.CloseScalar(deviations.TotalCost, engineering.TotalCost, 1e-7, "total cost");
    }

    [Theory]
    [InlineData("state", "operatingPoint.state")]
    [InlineData("input", "operatingPoint.input")]
    [InlineData("output", "operatingPoint.output")]
    public void AnOperatingPointOfTheWrongLengthIsRefusedByPath(string part, string path)
    {
        var document = Random(3).Deviations;
        var wrong = new double[9];
        var point = part switch
        {
            "state" => new OperatingPointSpec(State: wrong),
            "input" => new OperatingPointSpec(Input: wrong),
            _ => new OperatingPointSpec(Output: wrong),
        };
        var errors = ModelValidator.Validate(document with { OperatingPoint = point });
        Assert.Contains(errors, e => e.Path == path && e.Reason.Contains("expected"));
    }

    [Fact]
    public void NonFiniteOperatingValuesAndUnitsOfTheWrongLengthAreRefusedByPath()
    {
        var document = Random(3).Deviations;
        int n = document.Plant.A.Length;
        var state = new double[n];
        state[0] = double.NaN;
        var errors = ModelValidator.Validate(document with
        {
            OperatingPoint = new OperatingPointSpec(State: state),
            Labels = new LabelsSpec(Units: new UnitsSpec(Inputs: ["%", "%", "%", "%"])),
        });
        Assert.Contains(errors, e => e.Path == "operatingPoint.state[0]");
        Assert.Contains(errors, e => e.Path == "labels.units.inputs");
    }
}
