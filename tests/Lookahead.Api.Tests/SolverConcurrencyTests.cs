using System.IO.Pipelines;
using System.Net;
using System.Net.Http.Headers;
using System.Security.Cryptography;
using System.Text;
using Lookahead.Api.Access;
using Lookahead.Api.Tests.Support;
using Microsoft.AspNetCore.Mvc.Testing;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// Per-client concurrency of solver work: while one key's replay is running (its upload still arriving), that key's
/// next plan is refused with 429 and Retry-After when its slots and queue are full, another key plans as usual, and
/// the slot comes back when the replay ends. Requests that do no solver work never count.
/// </summary>
public class SolverConcurrencyTests
{
    private const string First = "first-client-key-31d0";
    private const string Second = "second-client-key-8e42";

    [Fact]
    public async Task A_running_replay_holds_its_clients_slot_and_no_one_elses()
    {
        await using var factory = new LookaheadFactory(new Dictionary<string, string?>
        {
            ["Auth:Keys:0:Hash"] = Hash(First),
            ["Auth:Keys:0:Scopes:0"] = AccessScopes.Admin,
            ["Auth:Keys:1:Hash"] = Hash(Second),
            ["Auth:Keys:1:Scopes:0"] = AccessScopes.Admin,
            ["RateLimiting:SolverConcurrency"] = "1",
            ["RateLimiting:SolverQueueLimit"] = "0",

            // Two rows fill a batch, so the replay answers its first rows while its upload is still open.
            ["Replay:BatchSize"] = "2",
        });
        var first = Client(factory, First);
        var second = Client(factory, Second);
        string id = await first.RegisterAsync(TestModels.TwoTanks);
        const string plan = """{"state":[0.5,-0.2]}""";
        Assert.Equal(HttpStatusCode.OK, (await first.PostJsonAsync($"/v1/models/{id}/plan", plan)).StatusCode);

        // A replay whose rows keep the request open until the test ends the upload.
        var upload = new Pipe();
        var body = new StreamContent(upload.Reader.AsStream());
        body.Headers.ContentType = new MediaTypeHeaderValue("text/csv");
        var replay = first.SendAsync(
            new HttpRequestMessage(HttpMethod.Post, $"/v1/models/{id}/plans") { Content = body },
            HttpCompletionOption.ResponseHeadersRead);
        // Several batches' worth: the replay reads one batch ahead before it answers the one before.
        string rows = "level_1,level_2\n" + string.Concat(Enumerable.Repeat("0.5,-0.2\n0.4,-0.1\n", 10));
        await upload.Writer.WriteAsync(Encoding.UTF8.GetBytes(rows));

        // The first rows' answers start the response, so from here on the replay holds its slot for sure.
        var replayed = await replay.WaitAsync(TimeSpan.FromSeconds(30));
        Assert.Equal(HttpStatusCode.OK, replayed.StatusCode);
        var answers = replayed.Content.ReadAsStringAsync();

        // With the replay holding the client's only slot and no queue, the same client's next plan is refused.
        var refused = await first.PostJsonAsync($"/v1/models/{id}/plan", plan);
        await refused.ReadProblemAsync(HttpStatusCode.TooManyRequests);
        Assert.Equal("1", refused.Headers.GetValues("Retry-After").Single());
        Assert.Contains("SolverConcurrency", await refused.Content.ReadAsStringAsync(), StringComparison.Ordinal);
        Assert.False(answers.IsCompleted);

        // Another key, and requests that are not solver work, go on.
        Assert.Equal(HttpStatusCode.OK, (await second.PostJsonAsync($"/v1/models/{id}/plan", plan)).StatusCode);
        Assert.Equal(HttpStatusCode.OK, (await first.GetAsync($"/v1/models/{id}")).StatusCode);

        await upload.Writer.CompleteAsync();
        Assert.Contains("complete=true", await answers.WaitAsync(TimeSpan.FromSeconds(30)), StringComparison.Ordinal);
        Assert.Equal(HttpStatusCode.OK, (await first.PostJsonAsync($"/v1/models/{id}/plan", plan)).StatusCode);
    }

    private static HttpClient Client(WebApplicationFactory<Program> factory, string key)
    {
        // Without redirect following: that handler buffers the whole request body (to resend it), which would hold
        // the replay back until its upload ended.
        var client = factory.CreateClient(new WebApplicationFactoryClientOptions { AllowAutoRedirect = false });
        client.DefaultRequestHeaders.Authorization = new AuthenticationHeaderValue("Bearer", key);
        return client;
    }

    private static string Hash(string key) => Convert.ToHexStringLower(SHA256.HashData(Encoding.UTF8.GetBytes(key)));
}
