using System.Globalization;
using System.Net;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// Models with an operating point through the HTTP contract: a plan, a replay row and a simulation in engineering
/// units equal those of the same model in deviations shifted by the operating point (limits given in engineering
/// units on the one, in deviations on the other); models without one keep their ids.
/// </summary>
public class EngineeringUnitsTests
{
    /// <summary>A two-zone store in deviations (invented numbers): zone temperatures in K from −20 °C, fan speeds from 60 %.</summary>
    private const string Deviations = """
        {
          "name": "two-zones-deviations",
          "plant": { "a": [[0.95, 0.02], [0.03, 0.9]], "b": [[-0.05, 0.0], [0.0, -0.04]], "sampleTime": 60, "timeDomain": "discrete" },
          "cost": { "horizon": 12, "outputWeight": [1.0, 1.0], "inputWeight": [0.01, 0.01], "inputRateWeight": [0.02, 0.02] },
          "limits": { "inputMin": [-60, -60], "inputMax": [40, 40], "inputRateMin": [-10, -10], "inputRateMax": [10, 10],
                      "outputMax": [2.0, 2.0], "outputViolationWeight": [100, 100] },
          "labels": { "states": ["zone_a", "zone_b"], "inputs": ["fan_a", "fan_b"], "outputs": ["t_a", "t_b"] }
        }
        """;

    /// <summary>The same model in engineering units: °C and % of capacity.</summary>
    private const string Engineering = """
        {
          "name": "two-zones-engineering",
          "plant": { "a": [[0.95, 0.02], [0.03, 0.9]], "b": [[-0.05, 0.0], [0.0, -0.04]], "sampleTime": 60, "timeDomain": "discrete" },
          "cost": { "horizon": 12, "outputWeight": [1.0, 1.0], "inputWeight": [0.01, 0.01], "inputRateWeight": [0.02, 0.02] },
          "limits": { "inputMin": [0, 0], "inputMax": [100, 100], "inputRateMin": [-10, -10], "inputRateMax": [10, 10],
                      "outputMax": [-18.0, -18.0], "outputViolationWeight": [100, 100] },
          "labels": { "states": ["zone_a", "zone_b"], "inputs": ["fan_a", "fan_b"], "outputs": ["t_a", "t_b"],
                      "units": { "states": ["°C", "°C"], "inputs": ["%", "%"], "outputs": ["°C", "°C"] } },
          "operatingPoint": { "state": [-20, -20], "input": [60, 60], "output": [-20, -20] }
        }
        """;

    private static readonly double[] StateOffset = [-20, -20];
    private static readonly double[] InputOffset = [60, 60];

    [Fact]
    public async Task Models_without_an_operating_point_keep_the_ids_they_had_before_it_existed()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();

        // Ids of these documents as registered before operating points and units were added to the document.
        Assert.Equal("9c4f06f72ae57a8a0578cf1e56cb2b149461675502a157a1be1baca3e7c157c8", await client.RegisterAsync(TestModels.DoubleIntegrator));
        Assert.Equal("8d860674ddb5da3b3460f648cdb9c1134b40a226fd13f8574e89b4041861efaa", await client.RegisterAsync(TestModels.TwoTanks));
    }

    [Fact]
    public async Task A_plan_in_engineering_units_is_the_deviation_plan_shifted_by_the_operating_point()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string deviations = await client.RegisterAsync(Deviations);
        string engineering = await client.RegisterAsync(Engineering);

        var expected = await (await client.PostJsonAsync($"/v1/models/{deviations}/plan", """{"state":[3.0,1.5],"reference":[-1.0,0.0],"previousInput":[5,-5]}""")).ReadJsonAsync();
        var response = await client.PostJsonAsync($"/v1/models/{engineering}/plan", """{"state":[-17.0,-18.5],"reference":[-21.0,-20.0],"previousInput":[65,55]}""");
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var actual = await response.ReadJsonAsync();

        AssertShifted(expected["inputs"]!.Matrix(), actual["inputs"]!.Matrix(), InputOffset);
        AssertShifted(expected["states"]!.Matrix(), actual["states"]!.Matrix(), StateOffset);
        AssertShifted(expected["outputs"]!.Matrix(), actual["outputs"]!.Matrix(), StateOffset);
        AssertShifted([expected["target"]!["input"]!.Doubles()], [actual["target"]!["input"]!.Doubles()], InputOffset);
        Assert.Equal(expected["cost"]!.GetValue<double>(), actual["cost"]!.GetValue<double>(), 1e-9);
        Assert.Equal(expected["activeLimits"]!.ToJsonString(), actual["activeLimits"]!.ToJsonString());

        // Every fan move respects 0…100 % exactly as registered.
        Assert.All(actual["inputs"]!.Matrix().SelectMany(u => u), u => Assert.InRange(u, 0.0, 100.0));
    }

    [Fact]
    public async Task Replay_rows_and_simulations_are_in_engineering_units_too()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string deviations = await client.RegisterAsync(Deviations);
        string engineering = await client.RegisterAsync(Engineering);

        var csv = await (await client.PostAsync($"/v1/models/{engineering}/plans", "timestamp,zone_a,zone_b\n1,-17.0,-18.5\n", "text/csv")).Content.ReadAsStringAsync();
        var row = ReplayAnswer.CsvLines(csv)[1].Split(',');
        var plan = await (await client.PostJsonAsync($"/v1/models/{deviations}/plan", """{"state":[3.0,1.5]}""")).ReadJsonAsync();
        var firstMove = plan["inputs"]!.Matrix()[0];
        Assert.Equal(firstMove[0] + 60, double.Parse(row[1], CultureInfo.InvariantCulture), 1e-6);
        Assert.Equal(firstMove[1] + 60, double.Parse(row[2], CultureInfo.InvariantCulture), 1e-6);

        var expected = await (await client.PostJsonAsync($"/v1/models/{deviations}/simulate", """{"initialState":[3.0,1.5],"steps":10}""")).ReadJsonAsync();
        var actual = await (await client.PostJsonAsync($"/v1/models/{engineering}/simulate", """{"initialState":[-17.0,-18.5],"steps":10}""")).ReadJsonAsync();
        AssertShifted(expected["inputs"]!.Matrix(), actual["inputs"]!.Matrix(), InputOffset);
        AssertShifted(expected["outputs"]!.Matrix(), actual["outputs"]!.Matrix(), StateOffset);
    }

    [Fact]
    public async Task The_details_echo_the_operating_point_and_the_chart_axes_carry_the_units()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(Engineering);

        var details = await (await client.GetAsync($"/v1/models/{id}")).ReadJsonAsync();
        Assert.Equal([-20.0, -20.0], details["document"]!["operatingPoint"]!["state"]!.Doubles());
        Assert.Equal("%", details["document"]!["labels"]!["units"]!["inputs"]![0]!.GetValue<string>());

        var svg = await (await client.PostJsonAsync($"/v1/models/{id}/plan?format=svg", """{"state":[-17.0,-18.5]}""")).Content.ReadAsStringAsync();
        Assert.Contains("output (°C)", svg, StringComparison.Ordinal);
        Assert.Contains("input (%)", svg, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("""{"state":[-20,-20,-20]}""", "operatingPoint.state")]
    [InlineData("""{"input":[60]}""", "operatingPoint.input")]
    [InlineData("""{"output":[-20,null]}""", "operatingPoint.output")]
    public async Task A_bad_operating_point_is_a_400_naming_the_field_and_nothing_is_stored(string point, string path)
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        var document = JsonNode.Parse(Engineering)!;
        document["operatingPoint"] = JsonNode.Parse(point);
        var errors = await (await client.PostJsonAsync("/v1/models", document)).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(errors, e => e.Path.StartsWith(path, StringComparison.Ordinal));

        var page = await (await client.GetAsync("/v1/models")).ReadJsonAsync();
        Assert.DoesNotContain(page.ToJsonString(), "two-zones-engineering", StringComparison.Ordinal);
    }

    private static void AssertShifted(double[][] deviations, double[][] engineering, double[] offset)
    {
        Assert.Equal(deviations.Length, engineering.Length);
        for (int k = 0; k < deviations.Length; k++)
        {
            for (int i = 0; i < offset.Length; i++)
            {
                Assert.Equal(deviations[k][i] + offset[i], engineering[k][i], 1e-7);
            }
        }
    }
}
