using System.Net;
using System.Text.Json.Nodes;
using Lookahead.Api.Hosting;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.Contract;

/// <summary>The problem document is typed, and every operation lists the problem answers it can give.</summary>
public class OpenApiProblemDocumentTests
{
    [Fact]
    public async Task The_problem_schema_names_every_member_a_refusal_carries()
    {
        await using var factory = new LookaheadFactory();
        var document = await ServedDocument.ReadAsync(factory);
        var problem = ServedDocument.Schema(document, "ProblemDetails");

        Assert.Equal(["errors", "instance", "status", "title", "traceId", "type"], ServedDocument.Strings(problem["required"]).Order());
        Assert.Equal("#/components/schemas/ProblemError", problem["properties"]!["errors"]!["items"]!["$ref"]!.GetValue<string>());
        Assert.Contains("urn:lookahead:problem:validation", ServedDocument.Strings(problem["properties"]!["type"]!["enum"]));

        // What the service really writes fits: every required member is there and the type is one of the listed ones.
        var refusal = await factory.CreateClient().PostJsonAsync("/v1/models", "{}");
        var written = await refusal.ReadJsonAsync();
        Assert.Equal(HttpStatusCode.BadRequest, refusal.StatusCode);
        Assert.All(ServedDocument.Strings(problem["required"]), member => Assert.NotNull(written[member]));
        Assert.Contains(written["type"]!.GetValue<string>(), ServedDocument.Strings(problem["properties"]!["type"]!["enum"]));
        Assert.Equal(ProblemSchemaDocumentFilter.ProblemTypeValues().Order(), ServedDocument.Strings(problem["properties"]!["type"]!["enum"]).Order());
    }

    [Fact]
    public async Task Every_operation_lists_429_500_and_503_and_body_operations_413_and_415()
    {
        await using var factory = new LookaheadFactory();
        var document = await ServedDocument.ReadAsync(factory);

        foreach (var (path, method, operation) in ServedDocument.Operations(document))
        {
            var responses = operation["responses"]!.AsObject();
            foreach (string status in new[] { "401", "403", "429", "500", "503" })
            {
                Assert.True(responses.ContainsKey(status), $"{method} {path} does not list {status}");
                Assert.Equal("#/components/schemas/ProblemDetails", responses[status]!["content"]!["application/problem+json"]!["schema"]!["$ref"]!.GetValue<string>());
            }

            Assert.NotNull(responses["429"]!["headers"]?["Retry-After"]);
            Assert.NotNull(responses["503"]!["headers"]?["Retry-After"]);
            if (operation["requestBody"] is not null)
            {
                Assert.True(responses.ContainsKey("413"), $"{method} {path} reads a body but does not list 413");
            }

            if (operation["requestBody"] is not null)
            {
                Assert.True(responses.ContainsKey("415"), $"{method} {path} reads a body but does not list 415");
            }
        }

        var operations = ServedDocument.Operations(document).ToDictionary(o => o.Operation["operationId"]!.GetValue<string>(), o => o.Operation);
        Assert.NotNull(operations["DeleteModel"]["responses"]!["409"]);
        Assert.NotNull(operations["StepStation"]["responses"]!["409"]);
        Assert.NotNull(operations["GetModel"]["responses"]!["304"]);
    }
}
