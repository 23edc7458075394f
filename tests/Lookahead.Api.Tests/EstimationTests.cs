using System.Net;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// The estimator through the HTTP contract: registration with its diagnostics, stateless /estimate samples, plans
/// from an estimate, and a closed loop run over HTTP that reaches its setpoint despite a gain mismatch and an
/// unmeasured load (the offset-free property, checked in the core against the published result).
/// </summary>
public class EstimationTests
{
    /// <summary>Two zones in engineering units with an output-disturbance estimator (invented numbers).</summary>
    private const string Model = """
        {
          "name": "two-zones-estimated",
          "plant": { "a": [[0.9, 0.05], [0.04, 0.85]], "b": [[0.1, 0.0], [0.02, 0.08]], "c": [[1, 0], [0, 1]], "sampleTime": 60, "timeDomain": "discrete" },
          "cost": { "horizon": 15, "outputWeight": [1.0, 1.0], "inputWeight": [0.05, 0.05] },
          "operatingPoint": { "state": [-20, -20], "input": [60, 60], "output": [-20, -20] },
          "estimator": { "processNoise": [1e-4, 1e-4, 1e-2, 1e-2], "measurementNoise": [1e-3, 1e-3] }
        }
        """;

    [Fact]
    public async Task Registration_reports_the_estimators_eigenvalues_and_the_default_disturbance_model()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        var response = await (await client.PostJsonAsync("/v1/models", Model)).ReadJsonAsync();
        var estimator = response["diagnostics"]!["estimator"]!;
        Assert.Equal("output", estimator["disturbanceModel"]!.GetValue<string>());
        Assert.Equal(2, estimator["disturbanceCount"]!.GetValue<int>());
        Assert.InRange(estimator["spectralRadius"]!.GetValue<double>(), 0.0, 0.999999);
        Assert.Equal(4, estimator["eigenvalues"]!.AsArray().Count);

        // The default is made explicit before hashing: stating it gives the same id.
        var stated = JsonNode.Parse(Model)!;
        stated["estimator"]!["disturbanceModel"] = "output";
        var again = await client.PostJsonAsync("/v1/models", stated);
        Assert.Equal(HttpStatusCode.OK, again.StatusCode);
    }

    [Fact]
    public async Task A_loop_over_http_reaches_the_setpoint_despite_mismatch_and_an_unmeasured_load()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);

        // The true plant (deviations): inputs 20 % stronger than modelled and a constant load.
        double[][] a = [[0.9, 0.05], [0.04, 0.85]];
        double[][] b = [[0.12, 0.0], [0.024, 0.096]];
        double[] load = [0.05, -0.03];
        double[] x = [0.0, 0.0];
        double[] reference = [-21.0, -19.5];
        double[] u = [60, 60];

        var first = await (await client.PostJsonAsync($"/v1/models/{id}/estimate", Body(null, u, Measure(x)))).ReadJsonAsync();
        Assert.True(first["initialised"]!.GetValue<bool>());
        Assert.Contains(first["warnings"]!.AsArray(), w => w!["code"]!.GetValue<string>() == "estimate-initialised");
        var estimate = first["estimate"]!;
        for (int k = 0; k < 250; k++)
        {
            var plan = await client.PostJsonAsync($"/v1/models/{id}/plan", new JsonObject { ["estimate"] = estimate.DeepClone(), ["reference"] = new JsonArray(reference[0], reference[1]) });
            Assert.Equal(HttpStatusCode.OK, plan.StatusCode);
            u = (await plan.ReadJsonAsync())["inputs"]!.Matrix()[0];
            double[] du = [u[0] - 60, u[1] - 60];
            x = [a[0][0] * x[0] + a[0][1] * x[1] + b[0][0] * du[0] + b[0][1] * du[1] + load[0], a[1][0] * x[0] + a[1][1] * x[1] + b[1][0] * du[0] + b[1][1] * du[1] + load[1]];
            var sample = await (await client.PostJsonAsync($"/v1/models/{id}/estimate", Body(estimate, u, Measure(x)))).ReadJsonAsync();
            estimate = sample["estimate"]!;
        }

        var y = Measure(x);
        Assert.True(Math.Abs(y[0] - reference[0]) <= 1e-6 * 21 && Math.Abs(y[1] - reference[1]) <= 1e-6 * 21, $"settled at {y[0]}, {y[1]}");
    }

    [Fact]
    public async Task A_missing_measurement_propagates_and_says_so()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        var first = await (await client.PostJsonAsync($"/v1/models/{id}/estimate", Body(null, [60, 60], [-20.5, -19.8]))).ReadJsonAsync();
        var blind = await (await client.PostJsonAsync($"/v1/models/{id}/estimate", Body(first["estimate"], [60, 60], null))).ReadJsonAsync();
        Assert.False(blind["measurementUsed"]!.GetValue<bool>());
        Assert.Null(blind["innovation"]);
        Assert.Contains(blind["warnings"]!.AsArray(), w => w!["code"]!.GetValue<string>() == "measurement-missing");
    }

    [Theory]
    [InlineData("""{"state":[-20,-20],"estimate":{"state":[-20,-20],"disturbance":[0,0]}}""", "estimate")]
    [InlineData("""{"estimate":{"state":[-20,-20]}}""", "estimate.disturbance")]
    [InlineData("""{"estimate":{"state":[-20,-20],"disturbance":[0]}}""", "estimate.disturbance")]
    public async Task A_bad_estimate_in_a_plan_is_a_400_naming_the_field(string body, string path)
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        var errors = await (await client.PostJsonAsync($"/v1/models/{id}/plan", body)).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(errors, e => e.Path == path);
    }

    [Fact]
    public async Task Models_without_an_estimator_refuse_estimates_and_bad_estimators_are_refused_by_path()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);
        var plan = await (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"estimate":{"state":[0,0],"disturbance":[0,0]}}""")).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(plan, e => e.Path == "estimate");
        var sample = await (await client.PostJsonAsync($"/v1/models/{id}/estimate", """{"appliedInput":[0],"measurement":[0,0]}""")).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(sample, e => e.Path == "estimator");

        var integrating = JsonNode.Parse(TestModels.DoubleIntegrator)!;
        integrating["estimator"] = JsonNode.Parse("""{"processNoise":[1,1,1,1],"measurementNoise":[1,1]}""");
        var refused = await (await client.PostJsonAsync("/v1/models", integrating)).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(refused, e => e.Path == "estimator.disturbanceModel");
        var wrongNoise = JsonNode.Parse(Model)!;
        wrongNoise["estimator"]!["processNoise"] = JsonNode.Parse("[1, 1]");
        var noise = await (await client.PostJsonAsync("/v1/models", wrongNoise)).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(noise, e => e.Path.StartsWith("estimator.processNoise", StringComparison.Ordinal));
    }

    private static double[] Measure(double[] x) => [x[0] - 20, x[1] - 20];

    private static JsonObject Body(JsonNode? estimate, double[] applied, double[]? measurement)
    {
        var body = new JsonObject { ["appliedInput"] = new JsonArray(applied.Select(v => (JsonNode)v).ToArray()) };
        if (estimate is not null)
        {
            body["estimate"] = estimate.DeepClone();
        }

        body["measurement"] = measurement is null ? null : new JsonArray(measurement.Select(v => (JsonNode)v).ToArray());
        return body;
    }
}
