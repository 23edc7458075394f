using System.Net;
using System.Text.Json;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

public class OpenApiDocumentTests
{
    /// <summary>
    /// The committed openapi/lookahead.json must match what the service serves. After an intended API change run
    /// the tests with LOOKAHEAD_UPDATE_OPENAPI=1 to rewrite the file, then review the diff.
    /// </summary>
    [Fact]
    public async Task The_served_openapi_document_matches_the_committed_file()
    {
        await using var factory = new LookaheadFactory();
        string served = await factory.CreateClient().GetStringAsync("/swagger/v1/swagger.json");
        var servedNode = JsonNode.Parse(served)!;
        string path = Path.Combine(Repository.Root, "openapi", "lookahead.json");

        if (Environment.GetEnvironmentVariable("LOOKAHEAD_UPDATE_OPENAPI") == "1")
        {
            await File.WriteAllTextAsync(path, servedNode.ToJsonString(new JsonSerializerOptions { WriteIndented = true }) + "\n");
            return;
        }

        Assert.True(File.Exists(path), $"{path} is missing; run the tests once with LOOKAHEAD_UPDATE_OPENAPI=1 to create it");
        var committed = JsonNode.Parse(await File.ReadAllTextAsync(path))!;
        Assert.True(
            JsonNode.DeepEquals(committed, servedNode),
            "openapi/lookahead.json differs from the served document; if the API change is intended, rerun with LOOKAHEAD_UPDATE_OPENAPI=1 and commit the file");
    }

    [Fact]
    public async Task Every_public_endpoint_is_documented_and_the_bare_endpoint_is_not()
    {
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Diagnostics:EnableBareEndpoint"] = "true" });
        var document = JsonNode.Parse(await factory.CreateClient().GetStringAsync("/swagger/v1/swagger.json"))!;
        var paths = document["paths"]!.AsObject().Select(p => p.Key).ToList();

        Assert.Contains("/v1/models", paths);
        Assert.Contains("/v1/models/{id}/plan", paths);
        Assert.Contains("/v1/models/{id}/plans", paths);
        Assert.Contains("/v1/models/{id}/simulate", paths);
        Assert.Contains("/v1/models/{id}/gain", paths);
        Assert.Contains("/v1/aliases/{name}/plan", paths);
        Assert.DoesNotContain(paths, p => p.Contains("echo", StringComparison.Ordinal));
        Assert.Equal(HttpStatusCode.OK, (await factory.CreateClient().GetAsync("/swagger/index.html")).StatusCode);
    }
}
