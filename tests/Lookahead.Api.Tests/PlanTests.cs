using System.Net;
using System.Text.Json;
using System.Xml.Linq;
using Lookahead.Api.Plans;
using Microsoft.AspNetCore.Http.Json;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Options;
using Lookahead.Api.Tests.Support;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Xunit;

namespace Lookahead.Api.Tests;

public class PlanTests
{
    [Fact]
    public async Task A_plan_has_n_plus_one_states_and_outputs_n_moves_and_status_optimal()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.TwoTanks);

        var response = await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[0.5,-0.2],"reference":[1,0.5],"previousInput":[0.1,0]}""");
        var plan = await response.ReadJsonAsync();

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal(id, plan["modelId"]!.GetValue<string>());
        Assert.Equal("optimal", plan["status"]!.GetValue<string>());
        var inputs = plan["inputs"]!.Matrix();
        var states = plan["states"]!.Matrix();
        var outputs = plan["outputs"]!.Matrix();
        Assert.Equal(20, inputs.Length);
        Assert.All(inputs, row => Assert.Equal(2, row.Length));
        Assert.Equal(21, states.Length);
        Assert.All(states, row => Assert.Equal(2, row.Length));
        Assert.Equal(21, outputs.Length);
        Assert.Equal([0.5, -0.2], states[0]);
        Assert.NotNull(plan["target"]!["state"]);
        Assert.Empty(plan["activeLimits"]!.AsArray());
        Assert.Empty(plan["warnings"]!.AsArray());
        Assert.True(plan["solveMicroseconds"]!.GetValue<double>() >= 0);
        Assert.Equal(0, plan["iterations"]!.GetValue<int>());
    }

    [Fact]
    public async Task A_plan_over_http_equals_the_core_plan_for_the_same_document()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.TwoTanks);
        var core = ModelCompiler.Compile(new ModelDocument(
            "two-tanks",
            new PlantSpec([[-0.02, 0.01], [0.01, -0.03]], [[0.05, 0.0], [0.0, 0.04]], [[1.0, 0.0], [0.0, 1.0]], 5, TimeDomain.Continuous),
            new CostSpec(20, WeightSpec.FromMatrix([[2.0, 0.0], [0.0, 1.0]]), WeightSpec.FromDiagonal([0.5, 0.5]), WeightSpec.FromDiagonal([0.1, 0.1]), TerminalWeightSpec.Stage)));
        var expected = core.Plan(new PlanRequest([0.5, -0.2], [1, 0.5], [0.1, 0]));

        var plan = await (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[0.5,-0.2],"reference":[1,0.5],"previousInput":[0.1,0]}""")).ReadJsonAsync();

        // Trajectories carry 15 significant digits (CompactNumber); the cost is written round-trip.
        AssertClose(expected.Inputs, plan["inputs"]!.Matrix().SelectMany(r => r).ToArray());
        AssertClose(expected.States, plan["states"]!.Matrix().SelectMany(r => r).ToArray());
        Assert.Equal(expected.Cost, plan["cost"]!.GetValue<double>());
    }

    [Fact]
    public async Task A_state_of_the_wrong_length_is_refused_naming_state()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var errors = await (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[1,2,3]}""")).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.Contains(errors, e => e.Path == "state" && e.Reason.Contains("expected 2", StringComparison.Ordinal));
    }

    [Fact]
    public async Task A_missing_state_and_an_unknown_field_are_refused()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var missing = await (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"reference":[1,0]}""")).ReadProblemAsync(HttpStatusCode.BadRequest);
        var unknown = await (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[1,0],"setpoint":[1,0]}""")).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.Contains(missing, e => e.Path == "state");
        Assert.Contains(unknown, e => e.Path == "setpoint");
    }

    [Fact]
    public async Task Planning_against_a_malformed_or_unknown_id_is_400_or_404()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();

        await (await client.PostJsonAsync("/v1/models/xyz/plan", """{"state":[1]}""")).ReadProblemAsync(HttpStatusCode.BadRequest);
        await (await client.PostJsonAsync($"/v1/models/{new string('f', 64)}/plan", """{"state":[1]}""")).ReadProblemAsync(HttpStatusCode.NotFound);
    }

    [Fact]
    public async Task A_plan_as_svg_is_an_xml_chart_with_polylines()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.TwoTanks);

        var response = await client.PostJsonAsync($"/v1/models/{id}/plan?format=svg", """{"state":[0.5,-0.2],"reference":[1,0.5]}""");

        Assert.Equal("image/svg+xml", response.Content.Headers.ContentType?.MediaType);
        var svg = XDocument.Parse(await response.Content.ReadAsStringAsync());
        XNamespace ns = "http://www.w3.org/2000/svg";
        Assert.Equal(ns + "svg", svg.Root!.Name);
        Assert.True(svg.Descendants(ns + "polyline").Count() >= 4);
        Assert.Contains(svg.Descendants(ns + "text"), t => t.Value == "valve_1");
        await (await client.PostJsonAsync($"/v1/models/{id}/plan?format=png", """{"state":[0.5,-0.2]}""")).ReadProblemAsync(HttpStatusCode.BadRequest);
    }

    [Fact]
    public async Task The_gain_has_m_rows_of_n_and_n_closed_loop_eigenvalues()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var gain = await (await client.GetAsync($"/v1/models/{id}/gain")).ReadJsonAsync();

        var k = gain["k"]!.Matrix();
        Assert.Single(k);
        Assert.Equal(2, k[0].Length);
        var eigenvalues = gain["closedLoopEigenvalues"]!.AsArray();
        Assert.Equal(2, eigenvalues.Count);
        double radius = eigenvalues.Max(z => Math.Sqrt(Math.Pow(z!["re"]!.GetValue<double>(), 2) + Math.Pow(z["im"]!.GetValue<double>(), 2)));
        Assert.Equal(gain["spectralRadius"]!.GetValue<double>(), radius, 9);
        Assert.True(radius < 1);
    }

    [Fact]
    public async Task The_plan_response_is_serialised_by_the_source_generated_context()
    {
        await using var factory = new LookaheadFactory();
        var options = factory.Services.GetRequiredService<IOptions<JsonOptions>>().Value.SerializerOptions;

        // The metadata the service writes a plan response with must come from the generated context, not reflection.
        var info = options.GetTypeInfo(typeof(PlanResponse));

        Assert.Same(ApiJsonContext.Default, info.OriginatingResolver);
        Assert.Same(ApiJsonContext.Default, options.GetTypeInfo(typeof(PlanRequestDto)).OriginatingResolver);
    }

    private static void AssertClose(double[] expected, double[] actual)
    {
        Assert.Equal(expected.Length, actual.Length);
        for (int i = 0; i < expected.Length; i++)
        {
            Assert.True(Math.Abs(expected[i] - actual[i]) <= 6e-15 * Math.Abs(expected[i]), $"[{i}] {expected[i]:R} vs {actual[i]:R}");
        }
    }

    [Fact]
    public async Task Demo_plan_keeps_every_input_within_inputMin_and_inputMax()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();

        // A door left open: every zone warm (°C), more cooling asked for than the chillers have (inputs in %).
        var plan = await (await client.PostJsonAsync("/v1/aliases/cold-store-demo/plan", """{"state":[-16,-17,-18],"previousInput":[50,50,0]}""")).ReadJsonAsync();

        foreach (var move in plan["inputs"]!.Matrix())
        {
            Assert.All(move, u => Assert.InRange(u, 0, 100));
        }
    }

    [Fact]
    public async Task A_configured_iteration_budget_ends_a_hard_plan_early_with_its_code_and_inside_the_hard_limits()
    {
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Planning:MaxSolverIterations"] = "3" });
        var client = factory.CreateClient();
        double[] previous = [50, 50, 0.0];

        // The demo with every zone warm needs far more than three iterations.
        var plan = await (await client.PostJsonAsync("/v1/aliases/cold-store-demo/plan", """{"state":[-17,-17.5,-18],"previousInput":[50,50,0]}""")).ReadJsonAsync();

        Assert.Equal("iteration-limit", plan["status"]!.GetValue<string>());
        Assert.Contains(plan["warnings"]!.AsArray(), w => w!["code"]!.GetValue<string>() == "iteration-limit" && w["count"]!.GetValue<int>() == 3);
        double[] rateMin = [-20, -20, -50], rateMax = [20, 20, 50];
        foreach (var move in plan["inputs"]!.Matrix())
        {
            for (int i = 0; i < 3; i++)
            {
                Assert.InRange(move[i], 0.0, 100.0);
                Assert.InRange(move[i] - previous[i], rateMin[i] - 1e-10, rateMax[i] + 1e-10);
            }

            previous = move;
        }
    }

    [Fact]
    public async Task An_iteration_budget_outside_its_range_stops_the_service_from_starting()
    {
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Planning:MaxSolverIterations"] = "0" });
        var failure = Assert.ThrowsAny<Exception>(() => factory.CreateClient());
        Assert.Contains("MaxSolverIterations", failure.ToString(), StringComparison.Ordinal);
    }
}
