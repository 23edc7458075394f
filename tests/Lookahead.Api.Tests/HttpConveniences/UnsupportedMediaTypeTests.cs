using System.Net;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.HttpConveniences;

/// <summary>A 415 says what to send, whether routing or a handler refused the content type.</summary>
public class UnsupportedMediaTypeTests
{
    [Fact]
    public async Task A_form_post_as_curl_d_sends_it_is_told_to_send_json_with_the_header_to_add()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();

        var response = await client.PostAsync("/v1/models", TestModels.DoubleIntegrator, "application/x-www-form-urlencoded");

        var errors = await response.ReadProblemAsync(HttpStatusCode.UnsupportedMediaType);
        var problem = JsonNode.Parse(await response.Content.ReadAsStringAsync())!;
        Assert.Equal("urn:lookahead:problem:unsupported-media-type", problem["type"]!.GetValue<string>());
        Assert.Contains("send Content-Type: application/json", problem["detail"]!.GetValue<string>(), StringComparison.Ordinal);
        Assert.Contains("-H 'Content-Type: application/json'", problem["detail"]!.GetValue<string>(), StringComparison.Ordinal);
        Assert.Equal("Content-Type", Assert.Single(errors).Path);
    }

    [Fact]
    public async Task A_plan_with_text_plain_is_told_to_send_json()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var response = await client.PostAsync($"/v1/models/{id}/plan", """{"state":[1,0]}""", "text/plain");

        await response.ReadProblemAsync(HttpStatusCode.UnsupportedMediaType);
        var problem = JsonNode.Parse(await response.Content.ReadAsStringAsync())!;
        Assert.Contains("send Content-Type: application/json", problem["detail"]!.GetValue<string>(), StringComparison.Ordinal);
        Assert.DoesNotContain("curl", problem["detail"]!.GetValue<string>(), StringComparison.Ordinal);
    }

    [Fact]
    public async Task Replay_names_all_three_types_it_takes()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var response = await client.PostAsync($"/v1/models/{id}/plans", "x", "text/plain");

        await response.ReadProblemAsync(HttpStatusCode.UnsupportedMediaType);
        string detail = JsonNode.Parse(await response.Content.ReadAsStringAsync())!["detail"]!.GetValue<string>();
        Assert.Contains("application/json", detail, StringComparison.Ordinal);
        Assert.Contains("application/x-ndjson", detail, StringComparison.Ordinal);
        Assert.Contains("text/csv", detail, StringComparison.Ordinal);
    }
}
