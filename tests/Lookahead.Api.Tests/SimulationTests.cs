using System.Net;
using System.Xml.Linq;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

public class SimulationTests
{
    private const string Run = """
        {"initialState":[1,0],"steps":40,"references":[{"fromStep":0,"reference":[0,0]},{"fromStep":20,"reference":[0.5,0]}],"disturbances":[[0,0.01]]}
        """;

    [Fact]
    public async Task A_simulation_returns_trajectories_of_the_right_length_and_totals()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var result = await (await client.PostJsonAsync($"/v1/models/{id}/simulate", Run)).ReadJsonAsync();

        Assert.Equal(40, result["steps"]!.GetValue<int>());
        Assert.Equal(41, result["states"]!.AsArray().Count);
        Assert.Equal(41, result["outputs"]!.AsArray().Count);
        Assert.Equal(40, result["inputs"]!.AsArray().Count);
        Assert.Equal(40, result["references"]!.AsArray().Count);
        Assert.True(result["totalCost"]!.GetValue<double>() > 0);
        Assert.Equal(0, result["nonOptimalSteps"]!.GetValue<int>());
        Assert.Equal([0.5, 0.0], result["references"]![25]!.Doubles());
    }

    [Fact]
    public async Task A_simulation_as_svg_is_a_chart_a_browser_can_open()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();

        var response = await client.PostJsonAsync("/v1/models/" + await DemoIdAsync(client) + "/simulate?format=svg", """{"initialState":[2,1,0.5],"steps":30,"references":[{"fromStep":10,"reference":[-1,-1,-1]}]}""");

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("image/svg+xml", response.Content.Headers.ContentType?.MediaType);
        var svg = XDocument.Parse(await response.Content.ReadAsStringAsync());
        XNamespace ns = "http://www.w3.org/2000/svg";
        var lines = svg.Descendants(ns + "polyline").ToList();
        Assert.True(lines.Count >= 6);
        Assert.Contains(lines, l => l.Attribute("stroke-dasharray") is not null);
        Assert.Contains(svg.Descendants(ns + "text"), t => t.Value == "chiller_1");
        Assert.Contains(svg.Descendants(ns + "text"), t => t.Value == "time (min)");
    }

    [Fact]
    public async Task Invalid_simulation_fields_are_refused_by_path()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var errors = await (await client.PostJsonAsync($"/v1/models/{id}/simulate", """{"initialState":[1],"steps":0,"references":[{"fromStep":0,"reference":[1]}],"truePlant":{"a":[[1]],"b":[[1]],"timeDomain":"discrete"}}""")).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.Contains(errors, e => e.Path.StartsWith("initialState", StringComparison.Ordinal));
        Assert.Contains(errors, e => e.Path == "steps");
        Assert.Contains(errors, e => e.Path.StartsWith("references[0].reference", StringComparison.Ordinal));
        Assert.Contains(errors, e => e.Path == "truePlant");
    }

    private static async Task<string> DemoIdAsync(HttpClient client) =>
        (await (await client.GetAsync("/v1/aliases/cold-store-demo")).ReadJsonAsync())["modelId"]!.GetValue<string>();
}
