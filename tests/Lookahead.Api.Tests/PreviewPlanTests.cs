using System.Net;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// Reference schedules and measured disturbances through the HTTP contract. The numbers are the core's (checked
/// against CVXOPT in the core's tests); here the wire must carry them unchanged: /plan, replay rows and errors.
/// </summary>
public class PreviewPlanTests
{
    /// <summary>Two zones, two inputs, the outdoor temperature as one measured disturbance (invented numbers).</summary>
    private const string Model = """
        {
          "name": "two-zones-outdoor",
          "plant": { "a": [[0.95, 0.02], [0.03, 0.9]], "b": [[-0.05, 0.0], [0.0, -0.04]], "e": [[0.01], [0.02]],
                     "sampleTime": 60, "timeDomain": "discrete" },
          "cost": { "horizon": 8, "outputWeight": [1.0, 1.0], "inputWeight": [0.01, 0.01] },
          "limits": { "inputMin": [-5, -5], "inputMax": [5, 5] },
          "labels": { "states": ["zone_a", "zone_b"], "inputs": ["fan_a", "fan_b"], "outputs": ["t_a", "t_b"], "disturbances": ["outdoor"] }
        }
        """;

    private static readonly ModelDocument Document = new(
        "two-zones-outdoor",
        new PlantSpec([[0.95, 0.02], [0.03, 0.9]], [[-0.05, 0.0], [0.0, -0.04]], null, 60, TimeDomain.Discrete, [[0.01], [0.02]]),
        new CostSpec(8, WeightSpec.FromDiagonal([1.0, 1.0]), WeightSpec.FromDiagonal([0.01, 0.01])),
        new LimitsSpec([-5.0, -5.0], [5.0, 5.0]));

    [Fact]
    public async Task A_schedule_and_a_forecast_on_the_wire_give_the_cores_plan()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);

        var response = await client.PostJsonAsync($"/v1/models/{id}/plan", """
            {"state":[1.0,0.5],"reference":[[0.0,0.0],[0.5,0.2],[1.0,0.4]],"disturbance":[[10],[12],[15],[20]]}
            """);
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var body = await response.ReadJsonAsync();
        var expected = ModelCompiler.Compile(Document).Plan(new PlanRequest([1.0, 0.5], ReferenceSchedule: [[0.0, 0.0], [0.5, 0.2], [1.0, 0.4]], Disturbance: [[10.0], [12.0], [15.0], [20.0]]));

        var inputs = body["inputs"]!.Matrix();
        for (int k = 0; k < expected.Horizon; k++)
        {
            Assert.Equal(expected.Input(k)[0], inputs[k][0], 1e-12);
            Assert.Equal(expected.Input(k)[1], inputs[k][1], 1e-12);
        }

        Assert.Equal(expected.Cost, body["cost"]!.GetValue<double>(), 1e-9);
        Assert.Equal(expected.Target!.Input[0], body["target"]!["input"]![0]!.GetValue<double>(), 1e-12);

        // One held vector is a forecast of one row.
        var held = await (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[1.0,0.5],"disturbance":[15]}""")).ReadJsonAsync();
        var heldRows = await (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[1.0,0.5],"disturbance":[[15]]}""")).ReadJsonAsync();
        Assert.Equal(held["inputs"]!.ToJsonString(), heldRows["inputs"]!.ToJsonString());
    }

    [Fact]
    public async Task Replay_rows_take_the_same_fields()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        const string request = """{"state":[1.0,0.5],"reference":[[0.5,0.2],[1.0,0.4]],"disturbance":[[12],[20]]}""";

        var plan = await (await client.PostJsonAsync($"/v1/models/{id}/plan", request)).ReadJsonAsync();
        var replay = await client.PostAsync($"/v1/models/{id}/plans", request + "\n", "application/x-ndjson");
        Assert.Equal(HttpStatusCode.OK, replay.StatusCode);
        var line = Assert.Single(ReplayAnswer.NdjsonResults(await replay.Content.ReadAsStringAsync()));
        Assert.Equal(plan["inputs"]!.Matrix()[0][0], line["firstMove"]![0]!.GetValue<double>(), 1e-12);
    }

    [Theory]
    [InlineData("""{"state":[1,0.5],"disturbance":[[1],[1],[1],[1],[1],[1],[1],[1],[1]]}""", "disturbance")]
    [InlineData("""{"state":[1,0.5],"disturbance":[[1],[1,2]]}""", "disturbance[1]")]
    [InlineData("""{"state":[1,0.5],"disturbance":[1,2]}""", "disturbance")]
    [InlineData("""{"state":[1,0.5],"reference":[[0,0],[0,0,0]]}""", "reference[1]")]
    [InlineData("""{"state":[1,0.5],"reference":[[0,0],[0,0],[0,0],[0,0],[0,0],[0,0],[0,0],[0,0],[0,0]]}""", "reference")]
    [InlineData("""{"state":[1,0.5],"reference":[[0,"x"]]}""", "reference[0][1]")]
    public async Task A_bad_schedule_or_forecast_is_a_400_naming_the_field(string body, string path)
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Model);
        var errors = await (await client.PostJsonAsync($"/v1/models/{id}/plan", body)).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(errors, e => e.Path == path);
    }

    [Fact]
    public async Task A_disturbance_for_a_model_without_one_is_a_400()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);
        var errors = await (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[1,0],"disturbance":[1]}""")).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(errors, e => e.Path == "disturbance" && e.Reason.Contains("plant.e", StringComparison.Ordinal));
    }
}
