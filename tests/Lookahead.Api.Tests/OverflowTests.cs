using System.Net;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>Finite but enormous numbers must come back as 400 problems naming the field, never as a 500 or as NaN in JSON.</summary>
public class OverflowTests
{
    [Theory]
    [InlineData("/plan", """{"state":[1e308,1e308]}""", "state")]
    [InlineData("/plan", """{"state":[1,2],"reference":[1e308,-1e308],"previousInput":[5,5]}""", "reference")]
    [InlineData("/simulate", """{"initialState":[1,2],"steps":5,"truePlant":{"a":[[1e308,0],[0,1]],"b":[[1,0],[0,1]],"timeDomain":"continuous"}}""", "truePlant")]
    public async Task Huge_values_are_a_bad_request_naming_the_field(string route, string body, string path)
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.TwoTanks);

        var response = await client.PostJsonAsync($"/v1/models/{id}{route}", body);

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Equal("application/problem+json", response.Content.Headers.ContentType?.MediaType);
        var problem = await response.ReadJsonAsync();
        Assert.Contains(problem["errors"]!.AsArray(), e => e!["path"]!.GetValue<string>() == path);
    }

    [Fact]
    public async Task A_continuous_plant_whose_hold_overflows_is_refused_at_registration()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        var response = await client.PostJsonAsync("/v1/models", """{"plant":{"a":[[1e200]],"b":[[1e200]],"sampleTime":1,"timeDomain":"continuous"},"cost":{"horizon":5,"outputWeight":[1],"inputWeight":[1],"terminalWeight":"stage"}}""");
        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        var problem = await response.ReadJsonAsync();
        Assert.Contains(problem["errors"]!.AsArray(), e => e!["path"]!.GetValue<string>().StartsWith("plant.", StringComparison.Ordinal));
    }
}
