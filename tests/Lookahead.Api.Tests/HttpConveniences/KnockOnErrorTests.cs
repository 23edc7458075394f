using System.Net;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.HttpConveniences;

/// <summary>One mistake gets one error: nothing checked against a size the mistake left unknown, no "missing" for a misspelt member.</summary>
public class KnockOnErrorTests
{
    [Fact]
    public async Task A_plant_matrix_that_is_not_square_is_the_only_error()
    {
        await using var factory = new LookaheadFactory();
        string body = TestModels.DoubleIntegrator.Replace("\"a\": [[1.0, 0.1], [0.0, 1.0]]", "\"a\": [[1.0, 0.1]]", StringComparison.Ordinal);

        var errors = await (await factory.CreateClient().PostJsonAsync("/v1/models", body)).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.StartsWith("plant.a", Assert.Single(errors).Path, StringComparison.Ordinal);
    }

    [Fact]
    public async Task A_wrong_length_input_weight_is_one_error_and_the_rest_of_the_model_is_still_checked()
    {
        await using var factory = new LookaheadFactory();
        string body = TestModels.DoubleIntegrator
            .Replace("\"inputWeight\": [0.01]", "\"inputWeight\": [0.01, 0.02]", StringComparison.Ordinal)
            .Replace("\"horizon\": 10", "\"horizon\": 0", StringComparison.Ordinal);

        var errors = await (await factory.CreateClient().PostJsonAsync("/v1/models", body)).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.Equal(["cost.horizon", "cost.inputWeight"], errors.Select(e => e.Path).Order());
    }

    [Fact]
    public async Task A_misspelt_state_is_one_error_not_also_a_missing_state()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var errors = await (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"stat":[1,0]}""")).ReadProblemAsync(HttpStatusCode.BadRequest);

        var error = Assert.Single(errors);
        Assert.Equal("stat", error.Path);
        Assert.EndsWith("did you mean 'state'?", error.Reason, StringComparison.Ordinal);
    }

    [Fact]
    public async Task An_unrelated_unknown_member_still_leaves_the_missing_state_reported()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var errors = await (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"colour":[1,0]}""")).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.Equal(["colour", "state"], errors.Select(e => e.Path).Order());
    }
}
