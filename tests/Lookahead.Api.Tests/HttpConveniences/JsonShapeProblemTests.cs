using System.Net;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.HttpConveniences;

/// <summary>
/// "Malformed JSON" is kept for bodies that are not JSON; valid JSON of the wrong shape is a validation problem naming
/// the field; a trailing comma is told in our own words.
/// </summary>
public class JsonShapeProblemTests
{
    private static string WithHorizon(string horizon) => TestModels.DoubleIntegrator.Replace("\"horizon\": 10", "\"horizon\": " + horizon, StringComparison.Ordinal);

    [Theory]
    [InlineData("\"ten\"", "must be an integer")]
    [InlineData("[10]", "must be an integer")]
    [InlineData("10.5", "must be an integer")]
    public async Task A_wrong_kind_of_value_is_a_validation_problem_naming_the_field(string horizon, string reason)
    {
        await using var factory = new LookaheadFactory();

        var response = await factory.CreateClient().PostJsonAsync("/v1/models", WithHorizon(horizon));

        var error = Assert.Single(await response.ReadProblemAsync(HttpStatusCode.BadRequest));
        Assert.Equal(("cost.horizon", reason), error);
        var problem = JsonNode.Parse(await response.Content.ReadAsStringAsync())!;
        Assert.Equal("urn:lookahead:problem:validation", problem["type"]!.GetValue<string>());
        Assert.NotEqual("Malformed JSON", problem["title"]!.GetValue<string>());
    }

    [Fact]
    public async Task A_body_that_is_not_json_is_malformed_json_with_line_and_position()
    {
        await using var factory = new LookaheadFactory();

        var response = await factory.CreateClient().PostJsonAsync("/v1/models", "{\"name\": x}");

        await response.ReadProblemAsync(HttpStatusCode.BadRequest);
        var problem = JsonNode.Parse(await response.Content.ReadAsStringAsync())!;
        Assert.Equal("urn:lookahead:problem:malformed-json", problem["type"]!.GetValue<string>());
        Assert.Equal("Malformed JSON", problem["title"]!.GetValue<string>());
        Assert.Equal(1, problem["line"]!.GetValue<long>());
    }

    [Fact]
    public async Task A_trailing_comma_gets_our_own_wording_not_the_readers()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var inObject = await client.PostJsonAsync("/v1/models", TestModels.DoubleIntegrator.Replace("\"inputWeight\": [0.01]", "\"inputWeight\": [0.01],", StringComparison.Ordinal));
        var inPlan = await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[1,0,]}""");

        foreach (var response in new[] { inObject, inPlan })
        {
            var error = Assert.Single(await response.ReadProblemAsync(HttpStatusCode.BadRequest));
            Assert.Contains("comma after the last", error.Reason, StringComparison.Ordinal);
            Assert.DoesNotContain("reader options", error.Reason, StringComparison.OrdinalIgnoreCase);
            Assert.DoesNotContain("not supported in this mode", error.Reason, StringComparison.Ordinal);
        }
    }
}
