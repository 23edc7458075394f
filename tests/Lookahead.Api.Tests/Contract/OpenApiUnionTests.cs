using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.Contract;

/// <summary>Weights and the terminal weight are typed unions (a vector or a matrix; a named choice or a matrix), with no untyped null alternative.</summary>
public class OpenApiUnionTests
{
    [Fact]
    public async Task A_weight_is_a_vector_or_a_matrix_of_numbers()
    {
        await using var factory = new LookaheadFactory();
        var document = await ServedDocument.ReadAsync(factory);

        foreach (string member in new[] { "outputWeight", "inputWeight", "inputRateWeight" })
        {
            var alternatives = ServedDocument.Schema(document, "CostDto")["properties"]![member]!["oneOf"]!.AsArray();
            Assert.Equal(2, alternatives.Count);
            // The matrix first: a generator that types a union by its first alternative keeps matrices (see the generated-client tests).
            Assert.Equal("matrix", alternatives[0]!["title"]!.GetValue<string>());
            Assert.Equal("number", alternatives[0]!["items"]!["items"]!["type"]!.GetValue<string>());
            Assert.Equal("diagonal", alternatives[1]!["title"]!.GetValue<string>());
            Assert.Equal("number", alternatives[1]!["items"]!["type"]!.GetValue<string>());
        }
    }

    [Fact]
    public async Task A_terminal_weight_is_a_named_choice_or_a_matrix()
    {
        await using var factory = new LookaheadFactory();
        var document = await ServedDocument.ReadAsync(factory);

        var alternatives = ServedDocument.Schema(document, "CostDto")["properties"]!["terminalWeight"]!["oneOf"]!.AsArray();
        Assert.Equal(2, alternatives.Count);
        Assert.Equal("array", alternatives[0]!["items"]!["type"]!.GetValue<string>());
        Assert.Equal(["riccati", "stage"], ServedDocument.Strings(alternatives[1]!["enum"]));
    }

    [Fact]
    public async Task No_schema_is_nullable_without_a_type()
    {
        await using var factory = new LookaheadFactory();
        var document = await ServedDocument.ReadAsync(factory);

        var untyped = ServedDocument.AllSchemas(document)
            .Where(s => s.ContainsKey("nullable") && !s.ContainsKey("type") && !s.ContainsKey("$ref"))
            .Select(s => s.ToJsonString())
            .ToList();
        Assert.Empty(untyped);
    }
}
