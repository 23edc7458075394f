using System.Net;
using Lookahead.Api.Http;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.HttpConveniences;

/// <summary>An unknown field is refused with the closest known member name, when one is close.</summary>
public class DidYouMeanTests
{
    [Theory]
    [InlineData("horizn", "horizon")]
    [InlineData("Horizon", "horizon")]
    [InlineData("inputWieght", "inputWeight")]
    [InlineData("ouputWeight", "outputWeight")]
    public void The_closest_member_is_offered(string unknown, string expected) =>
        Assert.Equal(expected, DidYouMean.Closest(unknown, ["horizon", "outputWeight", "inputWeight", "inputRateWeight", "terminalWeight"]));

    [Theory]
    [InlineData("colour")]
    [InlineData("x")]
    public void An_unrelated_name_gets_no_hint(string unknown) =>
        Assert.Null(DidYouMean.Closest(unknown, ["horizon", "outputWeight", "inputWeight"]));

    [Fact]
    public async Task A_misspelt_model_member_is_refused_with_its_path_and_the_hint()
    {
        await using var factory = new LookaheadFactory();
        string body = TestModels.DoubleIntegrator.Replace("\"sampleTime\"", "\"sampleTim\"", StringComparison.Ordinal);

        var error = Assert.Single(await (await factory.CreateClient().PostJsonAsync("/v1/models", body)).ReadProblemAsync(HttpStatusCode.BadRequest));

        Assert.Equal("plant.sampleTim", error.Path);
        Assert.EndsWith("did you mean 'sampleTime'?", error.Reason, StringComparison.Ordinal);
    }

    [Fact]
    public async Task A_misspelt_member_in_a_list_element_gets_the_elements_members()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var errors = await (await client.PostJsonAsync($"/v1/models/{id}/simulate", """{"initialState":[1,0],"steps":3,"references":[{"fromStp":0,"reference":[0,0]}]}""")).ReadProblemAsync(HttpStatusCode.BadRequest);

        var error = Assert.Single(errors);
        Assert.Equal("references[0].fromStp", error.Path);
        Assert.EndsWith("did you mean 'fromStep'?", error.Reason, StringComparison.Ordinal);
    }

    [Fact]
    public async Task A_misspelt_plan_member_gets_the_hint()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var errors = await (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[1,0],"previousInptu":[0]}""")).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.EndsWith("did you mean 'previousInput'?", Assert.Single(errors, e => e.Path == "previousInptu").Reason, StringComparison.Ordinal);
    }
}
