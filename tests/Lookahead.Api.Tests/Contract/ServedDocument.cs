using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;

namespace Lookahead.Api.Tests.Contract;

/// <summary>The OpenAPI document as the service serves it, and ways to walk it.</summary>
public static class ServedDocument
{
    public static async Task<JsonNode> ReadAsync(LookaheadFactory factory) =>
        JsonNode.Parse(await factory.CreateClient().GetStringAsync("/swagger/v1/swagger.json"))!;

    /// <summary>Every operation: its path, method and node.</summary>
    public static IEnumerable<(string Path, string Method, JsonObject Operation)> Operations(JsonNode document) =>
        document["paths"]!.AsObject().SelectMany(p => p.Value!.AsObject().Select(o => (p.Key, o.Key, o.Value!.AsObject())));

    public static JsonObject Schema(JsonNode document, string name) => document["components"]!["schemas"]![name]!.AsObject();

    public static IReadOnlyList<string> Strings(JsonNode? array) => array is null ? [] : [.. array.AsArray().Select(v => v!.GetValue<string>())];

    /// <summary>Every schema object anywhere in the document (depth first).</summary>
    public static IEnumerable<JsonObject> AllSchemas(JsonNode node)
    {
        if (node is JsonObject obj)
        {
            if (obj.ContainsKey("type") || obj.ContainsKey("oneOf") || obj.ContainsKey("nullable") || obj.ContainsKey("enum"))
            {
                yield return obj;
            }

            foreach (var (_, child) in obj)
            {
                if (child is not null)
                {
                    foreach (var found in AllSchemas(child))
                    {
                        yield return found;
                    }
                }
            }
        }
        else if (node is JsonArray array)
        {
            foreach (var child in array.OfType<JsonNode>())
            {
                foreach (var found in AllSchemas(child))
                {
                    yield return found;
                }
            }
        }
    }
}
