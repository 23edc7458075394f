using System.Net;
using System.Xml.Linq;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// The SVG charts: axes carry units, lower and upper limits differ in colour and dash and are labelled with their
/// values, limits lie beneath the signals, rate limits are drawn on a panel of moves, and samples outside a soft limit
/// are shaded.
/// </summary>
public class ChartLimitTests
{
    private static readonly XNamespace Svg = "http://www.w3.org/2000/svg";

    [Fact]
    public async Task Limits_are_labelled_with_values_distinct_for_min_and_max_and_drawn_beneath_the_signals()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        var svg = await ChartAsync(client, "/v1/aliases/cold-store-demo/plan?format=svg", """{"state":[-19,-19.5,-19.5],"previousInput":[30,30,0]}""");

        var texts = svg.Descendants(Svg + "text").Select(t => t.Value).ToList();
        Assert.Contains("output (°C)", texts);
        Assert.Contains("input (%)", texts);
        Assert.Contains("move (%)", texts);
        Assert.Contains("time (min)", texts);
        Assert.Contains("Input moves per sample (1 min) with rate limits", texts);

        var minLabels = svg.Descendants(Svg + "text").Where(t => (string?)t.Attribute("class") == "limit-min").Select(t => t.Value).ToList();
        var maxLabels = svg.Descendants(Svg + "text").Where(t => (string?)t.Attribute("class") == "limit-max").Select(t => t.Value).ToList();
        Assert.Equal(["min −23 °C", "min 0 %", "min −20 %", "min −50 %"], minLabels);
        Assert.Equal(["max −18 °C", "max 100 %", "max 20 %", "max 50 %"], maxLabels);

        var lines = svg.Descendants(Svg + "polyline").ToList();
        var minLine = lines.First(l => Title(l).StartsWith("min −23", StringComparison.Ordinal));
        var maxLine = lines.First(l => Title(l).StartsWith("max −18", StringComparison.Ordinal));
        Assert.NotEqual((string?)minLine.Attribute("stroke"), (string?)maxLine.Attribute("stroke"));
        Assert.NotEqual((string?)minLine.Attribute("stroke-dasharray"), (string?)maxLine.Attribute("stroke-dasharray"));

        // Document order is paint order: every limit of a panel before its first signal.
        Assert.True(lines.IndexOf(maxLine) < lines.FindIndex(l => Title(l) == "zone_a"));
        int fanMax = lines.FindIndex(l => Title(l).StartsWith("max 100 %", StringComparison.Ordinal));
        Assert.True(fanMax >= 0 && fanMax < lines.FindIndex(l => Title(l) == "chiller_1"));
        Assert.True(lines.FindIndex(l => Title(l).StartsWith("max 50 %", StringComparison.Ordinal)) < lines.FindIndex(l => Title(l) == "Δdoor_fan"));

        // Rate limits sit on the moves panel, beside the moves the plan makes.
        Assert.Contains(lines, l => Title(l) == "Δchiller_1");
    }

    [Fact]
    public async Task Samples_outside_a_soft_limit_are_shaded_and_a_plan_inside_its_limits_has_no_shading()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();

        // Zone A starts 3 °C above its upper soft limit: the first samples cannot be inside it.
        var outside = await ChartAsync(client, "/v1/aliases/cold-store-demo/plan?format=svg", """{"state":[-15,-19,-19.5],"previousInput":[0,0,0]}""");
        var inside = await ChartAsync(client, "/v1/aliases/cold-store-demo/plan?format=svg", """{"state":[-20,-20,-20],"previousInput":[0,0,0]}""");

        var shaded = outside.Descendants(Svg + "rect").Where(r => (string?)r.Attribute("class") == "soft-limit-violation").ToList();
        Assert.NotEmpty(shaded);
        Assert.All(shaded, r => Assert.Equal("zone_a outside its soft limits", r.Element(Svg + "title")!.Value));
        Assert.Contains("Outputs (shaded: outside a soft limit)", outside.Descendants(Svg + "text").Select(t => t.Value));
        Assert.DoesNotContain(inside.Descendants(Svg + "rect"), r => (string?)r.Attribute("class") == "soft-limit-violation");
    }

    [Fact]
    public async Task A_simulation_chart_draws_each_moves_first_step_from_the_input_held_before_it()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = (await (await client.GetAsync("/v1/aliases/cold-store-demo")).ReadJsonAsync())["modelId"]!.GetValue<string>();
        var svg = await ChartAsync(client, $"/v1/models/{id}/simulate?format=svg", """{"initialState":[-17,-18,-19],"steps":10,"previousInput":[30,30,0]}""");
        var withoutPrevious = await ChartAsync(client, $"/v1/models/{id}/simulate?format=svg", """{"initialState":[-17,-18,-19],"steps":10}""");

        // Held steps: each sample after the first adds a corner point; without the previous input the first move is unknown.
        int Points(XElement chart) => chart.Descendants(Svg + "polyline").First(l => Title(l) == "Δchiller_1").Attribute("points")!.Value.Split(' ').Length;
        Assert.Equal((2 * 11) - 1, Points(svg));
        Assert.Equal((2 * 10) - 1, Points(withoutPrevious));
    }

    private static string Title(XElement line) => line.Element(Svg + "title")?.Value ?? "";

    private static async Task<XElement> ChartAsync(HttpClient client, string url, string body)
    {
        var response = await client.PostJsonAsync(url, body);
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("image/svg+xml", response.Content.Headers.ContentType!.MediaType);
        return XElement.Parse(await response.Content.ReadAsStringAsync());
    }
}
