using System.Net;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.HttpConveniences;

/// <summary>CORS is off unless Cors:AllowedOrigins lists origins; then those origins (and only those) are allowed, preflights included.</summary>
public class CorsTests
{
    private const string Tuning = "https://tuning.example.net";

    [Fact]
    public async Task Without_configured_origins_no_cross_origin_header_is_sent()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();

        using var request = new HttpRequestMessage(HttpMethod.Get, "/v1/models");
        request.Headers.Add("Origin", Tuning);
        var response = await client.SendAsync(request);

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.False(response.Headers.Contains("Access-Control-Allow-Origin"));
    }

    [Fact]
    public async Task A_listed_origin_gets_a_preflight_and_the_allow_origin_header_and_another_does_not()
    {
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Cors:AllowedOrigins:0"] = Tuning });
        var client = factory.CreateClient();

        using var preflight = new HttpRequestMessage(HttpMethod.Options, "/v1/models");
        preflight.Headers.Add("Origin", Tuning);
        preflight.Headers.Add("Access-Control-Request-Method", "POST");
        preflight.Headers.Add("Access-Control-Request-Headers", "authorization,content-type");
        var answer = await client.SendAsync(preflight);
        Assert.Equal(HttpStatusCode.NoContent, answer.StatusCode);
        Assert.Equal(Tuning, answer.Headers.GetValues("Access-Control-Allow-Origin").Single());
        Assert.Contains("POST", string.Join(",", answer.Headers.GetValues("Access-Control-Allow-Methods")), StringComparison.Ordinal);

        using var get = new HttpRequestMessage(HttpMethod.Get, "/v1/models");
        get.Headers.Add("Origin", Tuning);
        var allowed = await client.SendAsync(get);
        Assert.Equal(Tuning, allowed.Headers.GetValues("Access-Control-Allow-Origin").Single());
        Assert.Contains("ETag", string.Join(",", allowed.Headers.GetValues("Access-Control-Expose-Headers")), StringComparison.OrdinalIgnoreCase);

        using var other = new HttpRequestMessage(HttpMethod.Get, "/v1/models");
        other.Headers.Add("Origin", "https://elsewhere.example.net");
        Assert.False((await client.SendAsync(other)).Headers.Contains("Access-Control-Allow-Origin"));
    }

    [Fact]
    public async Task An_origin_with_a_path_is_refused_at_start()
    {
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Cors:AllowedOrigins:0"] = Tuning + "/page" });

        var failure = await Assert.ThrowsAnyAsync<Exception>(() => factory.CreateClient().GetAsync("/health/live"));
        Assert.Contains("Cors:AllowedOrigins", failure.ToString(), StringComparison.Ordinal);
    }
}
