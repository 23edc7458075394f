using System.Net;
using System.Net.Http.Headers;
using System.Text;
using System.Text.Json;
using System.Text.Json.Nodes;
using Xunit;

namespace Lookahead.Api.Tests.Support;

/// <summary>Small helpers so tests read as requests and expectations.</summary>
public static class Http
{
    public static Task<HttpResponseMessage> PostJsonAsync(this HttpClient client, string url, string json) =>
        client.PostAsync(url, new StringContent(json, Encoding.UTF8, "application/json"));

    public static Task<HttpResponseMessage> PostJsonAsync(this HttpClient client, string url, JsonNode json) =>
        client.PostJsonAsync(url, json.ToJsonString());

    public static Task<HttpResponseMessage> PostAsync(this HttpClient client, string url, string body, string contentType)
    {
        var content = new StringContent(body, Encoding.UTF8);
        content.Headers.ContentType = MediaTypeHeaderValue.Parse(contentType);
        return client.PostAsync(url, content);
    }

    public static async Task<JsonNode> ReadJsonAsync(this HttpResponseMessage response) =>
        JsonNode.Parse(await response.Content.ReadAsStringAsync()) ?? throw new InvalidDataException("empty body");

    /// <summary>Asserts an RFC 9457 problem with the status and returns its errors as (path, reason).</summary>
    public static async Task<List<(string Path, string Reason)>> ReadProblemAsync(this HttpResponseMessage response, HttpStatusCode status)
    {
        string body = await response.Content.ReadAsStringAsync();
        Assert.True(status == response.StatusCode, $"expected {(int)status}, got {(int)response.StatusCode}: {body}");
        Assert.Equal("application/problem+json", response.Content.Headers.ContentType?.MediaType);
        var problem = JsonNode.Parse(body)!;
        Assert.Equal((int)status, problem["status"]!.GetValue<int>());
        Assert.False(string.IsNullOrEmpty(problem["type"]?.GetValue<string>()));
        Assert.False(string.IsNullOrEmpty(problem["title"]?.GetValue<string>()));
        Assert.DoesNotContain("   at ", body, StringComparison.Ordinal);
        return problem["errors"]!.AsArray().Select(e => (e!["path"]!.GetValue<string>(), e["reason"]!.GetValue<string>())).ToList();
    }

    public static async Task<string> RegisterAsync(this HttpClient client, string modelJson, HttpStatusCode expected = HttpStatusCode.Created)
    {
        var response = await client.PostJsonAsync("/v1/models", modelJson);
        var body = await response.Content.ReadAsStringAsync();
        Assert.True(expected == response.StatusCode, $"expected {(int)expected}, got {(int)response.StatusCode}: {body}");
        return JsonNode.Parse(body)!["id"]!.GetValue<string>();
    }

    public static double[] Doubles(this JsonNode node) => node.AsArray().Select(v => v!.GetValue<double>()).ToArray();

    public static double[][] Matrix(this JsonNode node) => node.AsArray().Select(r => r!.Doubles()).ToArray();

    public static JsonNode Clone(this JsonNode node) => JsonNode.Parse(node.ToJsonString())!;

    public static string Compact(string json) => JsonSerializer.Serialize(JsonDocument.Parse(json).RootElement);
}
