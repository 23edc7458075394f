using System.Net;
using System.Text.Json.Nodes;
using System.Xml.Linq;
using Lookahead.Api.Tests.Support;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// /simulate with measured and unmeasured disturbances, measurement noise and feedback from the model's estimator,
/// through the HTTP contract. The numerics are the core's (offset removal checked there against the published
/// result); here the wire must carry the fields, their units and their errors.
/// </summary>
public class SimulationFeedbackTests
{
    /// <summary>Two zones in engineering units with an output-disturbance estimator (invented numbers).</summary>
    private const string EstimatedModel = """
        {
          "name": "two-zones-estimated",
          "plant": { "a": [[0.9, 0.05], [0.04, 0.85]], "b": [[0.1, 0.0], [0.02, 0.08]], "c": [[1, 0], [0, 1]], "sampleTime": 60, "timeDomain": "discrete" },
          "cost": { "horizon": 15, "outputWeight": [1.0, 1.0], "inputWeight": [0.05, 0.05] },
          "labels": { "outputs": ["zone_a", "zone_b"] },
          "operatingPoint": { "state": [-20, -20], "input": [60, 60], "output": [-20, -20] },
          "estimator": { "processNoise": [1e-4, 1e-4, 1e-2, 1e-2], "measurementNoise": [1e-3, 1e-3] }
        }
        """;

    /// <summary>Inputs 20 % stronger than modelled, and a door left open from step 40: zone A reads 0.8 °C warmer.</summary>
    private const string MismatchAndLoad = """
        "initialState": [-20, -20], "steps": 300, "previousInput": [60, 60],
        "references": [{ "fromStep": 0, "reference": [-21, -19.5] }],
        "truePlant": { "a": [[0.9, 0.05], [0.04, 0.85]], "b": [[0.12, 0.0], [0.024, 0.096]], "timeDomain": "discrete" },
        "outputDisturbance": [{ "fromStep": 40, "offset": [0.8, 0.0] }]
        """;

    /// <summary>Two zones with the outdoor temperature as a measured disturbance, in engineering units (invented numbers).</summary>
    private const string OutdoorModel = """
        {
          "name": "two-zones-outdoor",
          "plant": { "a": [[0.95, 0.02], [0.03, 0.9]], "b": [[-0.05, 0.0], [0.0, -0.04]], "e": [[0.01], [0.02]], "sampleTime": 60, "timeDomain": "discrete" },
          "cost": { "horizon": 8, "outputWeight": [1.0, 1.0], "inputWeight": [0.01, 0.01] },
          "limits": { "inputMin": [-5, -5], "inputMax": [5, 5] },
          "operatingPoint": { "state": [2, 3], "input": [1, 1], "output": [2, 3], "disturbance": [15] }
        }
        """;

    [Fact]
    public async Task Feedback_from_the_estimate_reaches_the_setpoint_under_an_output_load_and_returns_the_estimates()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(EstimatedModel);

        var estimated = await (await client.PostJsonAsync($"/v1/models/{id}/simulate", $$"""{ {{MismatchAndLoad}}, "feedback": "estimate" }""")).ReadJsonAsync();
        var fromState = await (await client.PostJsonAsync($"/v1/models/{id}/simulate", $$"""{ {{MismatchAndLoad}} }""")).ReadJsonAsync();

        // Offset-free (Pannocchia & Rawlings, AIChE J. 49(2), 2003): the true outputs, load included, reach the
        // setpoint with the estimator; planning from the true state leaves the load and the mismatch as an offset.
        double[] reference = [-21, -19.5];
        var y = estimated["outputs"]!.Matrix()[^1];
        var yState = fromState["outputs"]!.Matrix()[^1];
        Assert.True(Math.Abs(y[0] - reference[0]) <= 1e-6 * 21 && Math.Abs(y[1] - reference[1]) <= 1e-6 * 21, $"settled at {y[0]}, {y[1]}");
        Assert.True(Math.Abs(yState[0] - reference[0]) >= 1e-3 * 21, $"from the state it settled at {yState[0]}");

        Assert.Equal(301, estimated["measurements"]!.AsArray().Count);
        Assert.Equal(301, estimated["estimates"]!.AsArray().Count);
        Assert.Equal(301, estimated["disturbanceEstimates"]!.AsArray().Count);
        Assert.Equal(301, estimated["estimatedOutputs"]!.AsArray().Count);

        // Units: the estimate is in engineering units (near −21 °C), the disturbance estimate an offset (near the 0.8 °C load
        // plus what the mismatch looks like at the outputs, so only its sign and size are checked).
        var xHat = estimated["estimates"]!.Matrix()[^1];
        var dHat = estimated["disturbanceEstimates"]!.Matrix()[^1];
        Assert.InRange(xHat[0], -25.0, -17.0);
        Assert.InRange(dHat[0], 0.1, 2.0);
        Near(y, estimated["estimatedOutputs"]!.Matrix()[^1], 1e-6, "estimated y_T");

        // Feedback from the state reports measurements but no estimates.
        Assert.Equal(301, fromState["measurements"]!.AsArray().Count);
        Assert.Null(fromState["estimates"]);
        Assert.Null(fromState["disturbanceEstimates"]);
    }

    [Fact]
    public async Task A_measured_disturbance_schedule_on_the_wire_gives_the_cores_run()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(OutdoorModel);

        var body = await (await client.PostJsonAsync($"/v1/models/{id}/simulate", """
            {"initialState":[2,3],"steps":20,"previousInput":[1,1],"references":[{"fromStep":0,"reference":[1,2.5]}],
             "measuredDisturbances":[{"fromStep":3,"disturbance":[25]},{"fromStep":12,"disturbance":[5]}]}
            """)).ReadJsonAsync();

        var document = new ModelDocument(
            "two-zones-outdoor",
            new PlantSpec([[0.95, 0.02], [0.03, 0.9]], [[-0.05, 0.0], [0.0, -0.04]], null, 60, TimeDomain.Discrete, [[0.01], [0.02]]),
            new CostSpec(8, WeightSpec.FromDiagonal([1.0, 1.0]), WeightSpec.FromDiagonal([0.01, 0.01])),
            new LimitsSpec([-5.0, -5.0], [5.0, 5.0]),
            OperatingPoint: new OperatingPointSpec([2.0, 3.0], [1.0, 1.0], [2.0, 3.0], [15.0]));
        var expected = ClosedLoopSimulator.Simulate(ModelCompiler.Compile(document), new SimulationRequest(
            [2.0, 3.0], 20, [new ReferenceChange(0, [1.0, 2.5])], PreviousInput: [1.0, 1.0],
            MeasuredDisturbances: [new MeasuredDisturbanceChange(3, [25.0]), new MeasuredDisturbanceChange(12, [5.0])]));

        var inputs = body["inputs"]!.Matrix();
        var states = body["states"]!.Matrix();
        for (int k = 0; k < 20; k++)
        {
            Near(expected.Inputs[k], inputs[k], 1e-12, $"u_{k}");
            Near(expected.States[k + 1], states[k + 1], 1e-12, $"x_{k + 1}");
        }
    }

    [Fact]
    public async Task Seeded_noise_over_http_is_reproducible_and_the_seed_matters()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(EstimatedModel);
        string Run(string noise) => $$"""{"initialState":[-20,-20],"steps":50,"previousInput":[60,60],"feedback":"estimate"{{noise}}}""";

        var first = await (await client.PostJsonAsync($"/v1/models/{id}/simulate", Run(""","measurementNoise":{"standardDeviation":[0.1,0.1],"seed":7}"""))).ReadJsonAsync();
        var again = await (await client.PostJsonAsync($"/v1/models/{id}/simulate", Run(""","measurementNoise":{"standardDeviation":[0.1,0.1],"seed":7}"""))).ReadJsonAsync();
        var seedZero = await (await client.PostJsonAsync($"/v1/models/{id}/simulate", Run(""","measurementNoise":{"standardDeviation":[0.1,0.1]}"""))).ReadJsonAsync();
        var quiet = await (await client.PostJsonAsync($"/v1/models/{id}/simulate", Run(""))).ReadJsonAsync();

        Assert.Equal(first["inputs"]!.ToJsonString(), again["inputs"]!.ToJsonString());
        Assert.Equal(first["measurements"]!.ToJsonString(), again["measurements"]!.ToJsonString());
        Assert.NotEqual(first["measurements"]!.ToJsonString(), seedZero["measurements"]!.ToJsonString());
        Assert.NotEqual(first["inputs"]!.ToJsonString(), quiet["inputs"]!.ToJsonString());
        Assert.Equal(quiet["outputs"]!.ToJsonString(), quiet["measurements"]!.ToJsonString());
    }

    [Fact]
    public async Task The_svg_of_a_run_from_the_estimate_draws_the_estimated_outputs_against_the_true_ones()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(EstimatedModel);

        var estimated = await client.PostJsonAsync($"/v1/models/{id}/simulate?format=svg", $$"""{ {{MismatchAndLoad}}, "feedback": "estimate" }""");
        var fromState = await client.PostJsonAsync($"/v1/models/{id}/simulate?format=svg", $$"""{ {{MismatchAndLoad}} }""");

        XNamespace ns = "http://www.w3.org/2000/svg";
        var svg = XDocument.Parse(await estimated.Content.ReadAsStringAsync());
        var estimateLines = svg.Descendants(ns + "polyline").Where(l => l.Element(ns + "title")?.Value.EndsWith(" estimate", StringComparison.Ordinal) == true).ToList();
        Assert.Equal(["zone_a estimate", "zone_b estimate"], estimateLines.Select(l => l.Element(ns + "title")!.Value));
        Assert.All(estimateLines, l => Assert.NotNull(l.Attribute("stroke-dasharray")));
        Assert.Contains(svg.Descendants(ns + "text"), t => t.Value == "zone_a estimate");
        Assert.Contains(svg.Descendants(ns + "polyline"), l => l.Element(ns + "title")?.Value == "zone_a" && l.Attribute("stroke-dasharray") is null);

        var plain = XDocument.Parse(await fromState.Content.ReadAsStringAsync());
        Assert.DoesNotContain(plain.Descendants(ns + "polyline"), l => l.Element(ns + "title")?.Value.EndsWith(" estimate", StringComparison.Ordinal) == true);
    }

    [Fact]
    public async Task Invalid_feedback_disturbance_and_noise_fields_are_refused_by_path()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string plain = await client.RegisterAsync(TestModels.DoubleIntegrator);
        string estimated = await client.RegisterAsync(EstimatedModel);

        // Feedback from an estimate needs an estimator; a model without plant.e has no measured disturbances.
        var errors = await (await client.PostJsonAsync($"/v1/models/{plain}/simulate", """
            {"initialState":[1,0],"steps":10,"feedback":"estimate","measuredDisturbances":[{"fromStep":0,"disturbance":[1]}]}
            """)).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(errors, e => e.Path == "feedback" && e.Reason.Contains("estimator", StringComparison.Ordinal));
        Assert.Contains(errors, e => e.Path == "measuredDisturbances" && e.Reason.Contains("plant.e", StringComparison.Ordinal));

        // Widths, a negative deviation, an unknown feedback and a missing step.
        errors = await (await client.PostJsonAsync($"/v1/models/{estimated}/simulate", """
            {"initialState":[-20,-20],"steps":10,"feedback":"truth"}
            """)).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(errors, e => e.Path == "feedback" && e.Reason.Contains("\"estimate\"", StringComparison.Ordinal));

        errors = await (await client.PostJsonAsync($"/v1/models/{estimated}/simulate", """
            {"initialState":[-20,-20],"steps":10,"feedback":"estimate",
             "outputDisturbance":[{"fromStep":0,"offset":[1]}],
             "measurementNoise":{"standardDeviation":[0.1,-0.2],"seed":1}}
            """)).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(errors, e => e.Path == "outputDisturbance[0].offset");
        Assert.Contains(errors, e => e.Path == "measurementNoise.standardDeviation[1]");
        Assert.DoesNotContain(errors, e => e.Path == "feedback");

        errors = await (await client.PostJsonAsync($"/v1/models/{estimated}/simulate", """
            {"initialState":[-20,-20],"steps":10,"outputDisturbance":[{"offset":[1,1]}],"measurementNoise":{"standardDeviation":[0.1]}}
            """)).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(errors, e => e.Path == "outputDisturbance[0].fromStep");

        errors = await (await client.PostJsonAsync($"/v1/models/{estimated}/simulate", """
            {"initialState":[-20,-20],"steps":10,"measurementNoise":{"standardDeviation":[0.1]}}
            """)).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(errors, e => e.Path == "measurementNoise.standardDeviation");
    }

    /// <summary>|a − e| ≤ tol·max(1, |e|) entry by entry (the wire carries 15 significant digits).</summary>
    private static void Near(double[] expected, double[] actual, double tolerance, string what)
    {
        Assert.Equal(expected.Length, actual.Length);
        for (int i = 0; i < expected.Length; i++)
        {
            Assert.True(Math.Abs(expected[i] - actual[i]) <= tolerance * Math.Max(1, Math.Abs(expected[i])), $"{what}[{i}]: expected {expected[i]:R}, got {actual[i]:R}");
        }
    }
}
