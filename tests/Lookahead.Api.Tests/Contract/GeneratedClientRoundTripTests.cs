using System.Reflection;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.Contract;

/// <summary>
/// A client generated from the committed document registers a model with matrix weights and a matrix terminal weight
/// through the service and reads it back with the matrices intact; so do the diagonal and named forms.
/// </summary>
public class GeneratedClientRoundTripTests
{
    /// <summary>Uses the generated types by name, as an application would; its answer is the read-back document as JSON.</summary>
    private const string Driver = """
        using System.Collections.Generic;
        using System.Net.Http;
        using System.Text.Json;
        using System.Threading.Tasks;
        using Generated;

        public static class Driver
        {
            private static List<List<double>> M(params double[][] rows)
            {
                var matrix = new List<List<double>>();
                foreach (var row in rows) { matrix.Add(new List<double>(row)); }
                return matrix;
            }

            public static async Task<string> RoundTripAsync(HttpClient http, bool matrices)
            {
                var client = new LookaheadClient(http);
                var model = new ModelDocumentDto
                {
                    Name = matrices ? "two-zone-matrices" : "two-zone-diagonals",
                    Plant = new PlantDto
                    {
                        A = M(new[] { 0.9, 0.05 }, new[] { 0.04, 0.85 }),
                        B = M(new[] { 0.1, 0.0 }, new[] { 0.02, 0.08 }),
                        SampleTime = 60,
                        TimeDomain = PlantDtoTimeDomain.Discrete,
                    },
                    Cost = new CostDto
                    {
                        Horizon = 10,
                        OutputWeight = matrices ? M(new[] { 2.0, 0.5 }, new[] { 0.5, 1.0 }) : new List<double> { 2.0, 1.0 },
                        InputWeight = matrices ? M(new[] { 0.1, 0.0 }, new[] { 0.0, 0.2 }) : new List<double> { 0.1, 0.2 },
                        TerminalWeight = matrices ? M(new[] { 5.0, 1.0 }, new[] { 1.0, 4.0 }) : "stage",
                    },
                };
                var registered = await client.RegisterModelAsync(model);
                var read = await client.GetModelAsync(registered.Id);
                var plan = await client.PlanForModelAsync(registered.Id, null, new PlanRequestDto { State = new List<double> { 1.0, -1.0 } });
                return JsonSerializer.Serialize(new
                {
                    id = registered.Id,
                    readId = read.Id,
                    cost = read.Document.Cost,
                    timeDomain = read.Document.Plant.TimeDomain.ToString(),
                    status = plan.Status.ToString(),
                    firstMove = plan.Inputs[0],
                });
            }
        }
        """;

    [Fact]
    public async Task Matrix_weights_and_a_matrix_terminal_weight_survive_a_round_trip_through_a_generated_client()
    {
        var answer = await RoundTripAsync(matrices: true);

        var cost = answer["cost"]!;
        Assert.Equal(answer["id"]!.GetValue<string>(), answer["readId"]!.GetValue<string>());
        Assert.True(JsonNode.DeepEquals(JsonNode.Parse("[[2,0.5],[0.5,1]]"), cost["outputWeight"]), cost.ToJsonString());
        Assert.True(JsonNode.DeepEquals(JsonNode.Parse("[[0.1,0],[0,0.2]]"), cost["inputWeight"]), cost.ToJsonString());
        Assert.True(JsonNode.DeepEquals(JsonNode.Parse("[[5,1],[1,4]]"), cost["terminalWeight"]), cost.ToJsonString());
        Assert.Equal("Discrete", answer["timeDomain"]!.GetValue<string>());
        Assert.Equal("Optimal", answer["status"]!.GetValue<string>());
        Assert.Equal(2, answer["firstMove"]!.AsArray().Count);
    }

    [Fact]
    public async Task Diagonal_weights_and_a_named_terminal_weight_survive_a_round_trip_through_a_generated_client()
    {
        var answer = await RoundTripAsync(matrices: false);

        var cost = answer["cost"]!;
        Assert.True(JsonNode.DeepEquals(JsonNode.Parse("[2,1]"), cost["outputWeight"]), cost.ToJsonString());
        Assert.True(JsonNode.DeepEquals(JsonNode.Parse("[0.1,0.2]"), cost["inputWeight"]), cost.ToJsonString());
        Assert.Equal("stage", cost["terminalWeight"]!.GetValue<string>());
    }

    private static async Task<JsonNode> RoundTripAsync(bool matrices)
    {
        string document = await File.ReadAllTextAsync(Path.Combine(Repository.Root, "openapi", "lookahead.json"));
        var assembly = GeneratedClient.Compile(await GeneratedClient.GenerateAsync(document), Driver);
        var run = assembly.GetType("Driver")!.GetMethod("RoundTripAsync", BindingFlags.Public | BindingFlags.Static)!;

        await using var factory = new LookaheadFactory();
        var task = (Task<string>)run.Invoke(null, [factory.CreateClient(), matrices])!;
        return JsonNode.Parse(await task)!;
    }
}
