using System.Net;
using System.Text.Json.Nodes;
using Xunit;

namespace Lookahead.Api.Tests.Support;

/// <summary>Requests the station tests send, and what they read back.</summary>
public static class Stations
{
    public static async Task<JsonNode> StepAsync(HttpClient client, string station, long sequence, double[]? measurement, double[]? applied, double[]? reference = null) =>
        await StepAsync(client, station, StepBody(sequence, measurement, applied, reference));

    /// <summary>Posts a step and asserts a 200.</summary>
    public static async Task<JsonNode> StepAsync(HttpClient client, string station, JsonObject body)
    {
        var response = await client.PostJsonAsync($"/v1/stations/{station}/step", body);
        string text = await response.Content.ReadAsStringAsync();
        Assert.True(response.StatusCode == HttpStatusCode.OK, $"step {body["sequence"]}: {(int)response.StatusCode} {text}");
        return JsonNode.Parse(text)!;
    }

    public static JsonObject StepBody(long sequence, double[]? measurement, double[]? applied, double[]? reference)
    {
        var body = new JsonObject { ["sequence"] = sequence, ["measurement"] = measurement is null ? null : Array(measurement) };
        if (applied is not null)
        {
            body["appliedInput"] = Array(applied);
        }

        if (reference is not null)
        {
            body["reference"] = Array(reference);
        }

        return body;
    }

    /// <summary>The body of a stateless /estimate call; a null measurement is a missing reading.</summary>
    public static JsonObject EstimateBody(JsonNode? estimate, double[] applied, double[]? measurement)
    {
        var body = new JsonObject { ["appliedInput"] = Array(applied), ["measurement"] = measurement is null ? null : Array(measurement) };
        if (estimate is not null)
        {
            body["estimate"] = estimate.DeepClone();
        }

        return body;
    }

    public static async Task BindAsync(HttpClient client, string station, string model, string? detail = null)
    {
        var body = new JsonObject { ["model"] = model };
        if (detail is not null)
        {
            body["detail"] = detail;
        }

        var response = await client.PutAsync($"/v1/stations/{station}", Json(body));
        Assert.True(response.IsSuccessStatusCode, $"bind {station}: {(int)response.StatusCode} {await response.Content.ReadAsStringAsync()}");
    }

    public static IEnumerable<string> Codes(JsonNode answer) => answer["warnings"]!.AsArray().Select(w => w!["code"]!.GetValue<string>());

    public static JsonArray Array(double[] values) => new(values.Select(v => (JsonNode)v).ToArray());

    public static JsonArray Rows(double[][] rows) => new(rows.Select(r => (JsonNode)Array(r)).ToArray());

    public static StringContent Json(JsonNode node) => Json(node.ToJsonString());

    public static StringContent Json(string text) => new(text, System.Text.Encoding.UTF8, "application/json");
}
