using System.Net;
using System.Text;
using System.Text.Json.Nodes;
using Lookahead.Api.Http;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.Contract;

/// <summary>Replay's NDJSON and CSV have schemas of their own; every operation has an example, and the examples work.</summary>
public class OpenApiMediaTypesAndExamplesTests
{
    [Fact]
    public async Task Replay_takes_and_gives_json_ndjson_and_csv_each_with_its_own_schema()
    {
        await using var factory = new LookaheadFactory();
        var document = await ServedDocument.ReadAsync(factory);
        var replay = document["paths"]!["/v1/models/{id}/plans"]!["post"]!;

        string Ref(JsonNode? content, string mediaType) => content![mediaType]!["schema"]!["$ref"]!.GetValue<string>();
        Assert.Equal("#/components/schemas/ReplayRequest", Ref(replay["requestBody"]!["content"], "application/json"));
        Assert.Equal("#/components/schemas/ReplayNdjsonUpload", Ref(replay["requestBody"]!["content"], "application/x-ndjson"));
        Assert.Equal("#/components/schemas/ReplayCsvUpload", Ref(replay["requestBody"]!["content"], "text/csv"));
        Assert.Equal("#/components/schemas/ReplayResponse", Ref(replay["responses"]!["200"]!["content"], "application/json"));
        Assert.Equal("#/components/schemas/ReplayNdjsonAnswer", Ref(replay["responses"]!["200"]!["content"], "application/x-ndjson"));
        Assert.Equal("#/components/schemas/ReplayCsvAnswer", Ref(replay["responses"]!["200"]!["content"], "text/csv"));
    }

    [Fact]
    public async Task Every_operation_has_an_example_and_the_document_has_servers_and_described_tags()
    {
        await using var factory = new LookaheadFactory();
        var document = await ServedDocument.ReadAsync(factory);

        foreach (var (path, method, operation) in ServedDocument.Operations(document))
        {
            bool body = operation["requestBody"]?["content"]?.AsObject().Any(m => m.Value!["example"] is not null) == true;
            bool parameter = operation["parameters"]?.AsArray().Any(p => p!["example"] is not null) == true;
            Assert.True(body || parameter, $"{method} {path} has no example");
        }

        Assert.NotEmpty(document["servers"]!.AsArray());
        Assert.All(document["tags"]!.AsArray(), tag => Assert.False(string.IsNullOrWhiteSpace(tag!["description"]?.GetValue<string>())));
    }

    [Fact]
    public async Task The_example_model_id_is_the_demo_model_the_service_registers()
    {
        await using var factory = new LookaheadFactory();
        var alias = await (await factory.CreateClient().GetAsync("/v1/aliases/cold-store-demo")).ReadJsonAsync();

        Assert.Equal(OperationExampleConventions.ExampleModelId, alias["modelId"]!.GetValue<string>());
    }

    /// <summary>Each request example, sent to its route with its parameter examples, is accepted (the station is bound before it steps).</summary>
    [Fact]
    public async Task Every_request_example_is_accepted_by_the_service()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        var document = await ServedDocument.ReadAsync(factory);
        var examples = ServedDocument.Operations(document)
            .Where(o => o.Operation["requestBody"] is not null)
            .OrderBy(o => o.Operation["operationId"]!.GetValue<string>() == "StepStation" ? 1 : 0)
            .ToList();
        Assert.NotEmpty(examples);

        foreach (var (path, method, operation) in examples)
        {
            string url = path;
            foreach (var parameter in operation["parameters"]?.AsArray() ?? [])
            {
                if (parameter!["in"]!.GetValue<string>() == "path")
                {
                    url = url.Replace("{" + parameter["name"]!.GetValue<string>() + "}", parameter["example"]!.ToString(), StringComparison.Ordinal);
                }
            }

            foreach (var (mediaType, media) in operation["requestBody"]!["content"]!.AsObject())
            {
                var example = media!["example"];
                Assert.True(example is not null, $"{method} {path} has no {mediaType} example");
                string text = example is JsonValue value && value.TryGetValue(out string? raw) ? raw : example.ToJsonString();
                using var request = new HttpRequestMessage(new HttpMethod(method.ToUpperInvariant()), url)
                {
                    Content = new StringContent(text, Encoding.UTF8, mediaType),
                };
                var response = await client.SendAsync(request);
                string answer = await response.Content.ReadAsStringAsync();
                Assert.True(response.StatusCode is HttpStatusCode.OK or HttpStatusCode.Created, $"{method} {url} ({mediaType}) answered {(int)response.StatusCode}: {answer}");
                Assert.DoesNotContain("\"status\":\"error\"", answer, StringComparison.Ordinal);
                Assert.DoesNotContain(",error,", answer, StringComparison.Ordinal);
            }
        }
    }
}
