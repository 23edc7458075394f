using System.Net;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.HttpConveniences;

/// <summary>A query parameter the route does not bind is refused like an unknown body field: 400 naming it, with the closest name.</summary>
public class UnknownQueryParameterTests
{
    [Fact]
    public async Task A_misspelt_query_parameter_is_refused_naming_it_and_the_closest_known_one()
    {
        await using var factory = new LookaheadFactory();
        var errors = await (await factory.CreateClient().GetAsync("/v1/models?offest=3")).ReadProblemAsync(HttpStatusCode.BadRequest);

        var error = Assert.Single(errors);
        Assert.Equal("offest", error.Path);
        Assert.Contains("did you mean 'offset'", error.Reason, StringComparison.Ordinal);
        Assert.Contains("offset, limit", error.Reason, StringComparison.Ordinal);
    }

    [Fact]
    public async Task A_route_without_query_parameters_refuses_any()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var errors = await (await client.GetAsync($"/v1/models/{id}?verbose=1")).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.Equal("verbose", Assert.Single(errors).Path);
        Assert.Contains("takes no query parameters", errors[0].Reason, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Parameters_a_route_declares_keep_working()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/v1/models?offset=0&limit=5")).StatusCode);
        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/v1/stations?limit=5")).StatusCode);
        var svg = await client.PostJsonAsync($"/v1/models/{id}/plan?format=svg", """{"state":[1,0]}""");
        Assert.Equal(HttpStatusCode.OK, svg.StatusCode);
        Assert.Equal("image/svg+xml", svg.Content.Headers.ContentType!.MediaType);
        Assert.Equal(HttpStatusCode.OK, (await client.PostJsonAsync($"/v1/models/{id}/simulate?format=json", """{"initialState":[1,0],"steps":3}""")).StatusCode);
        var replay = await client.PostAsync($"/v1/models/{id}/plans?detail=full", """{"state":[1,0]}""" + "\n", "application/x-ndjson");
        Assert.Equal(HttpStatusCode.OK, replay.StatusCode);
        Assert.Contains("\"states\"", await replay.Content.ReadAsStringAsync(), StringComparison.Ordinal);
    }

    [Fact]
    public async Task A_declared_parameter_with_a_wrong_case_is_refused_and_the_right_case_suggested()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var errors = await (await client.PostJsonAsync($"/v1/models/{id}/plan?Format=svg", """{"state":[1,0]}""")).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.Equal("Format", Assert.Single(errors).Path);
        Assert.Contains("did you mean 'format'", errors[0].Reason, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Health_and_document_routes_are_not_checked()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();

        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/health/live?probe=1")).StatusCode);
        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/swagger/v1/swagger.json?v=2")).StatusCode);
    }
}
