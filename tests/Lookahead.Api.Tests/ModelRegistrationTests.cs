using System.Net;
using System.Net.Http.Headers;
using System.Text;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

public class ModelRegistrationTests
{
    [Fact]
    public async Task Registering_new_content_returns_201_with_location_and_the_same_content_again_returns_200_with_the_same_id()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();

        var first = await client.PostJsonAsync("/v1/models", TestModels.DoubleIntegrator);
        Assert.Equal(HttpStatusCode.Created, first.StatusCode);
        var created = await first.ReadJsonAsync();
        string id = created["id"]!.GetValue<string>();
        Assert.Matches("^[0-9a-f]{64}$", id);
        Assert.Equal($"/v1/models/{id}", first.Headers.Location?.OriginalString);
        Assert.True(created["created"]!.GetValue<bool>());
        Assert.Equal(2, created["dimensions"]!["n"]!.GetValue<int>());
        Assert.Equal(1, created["dimensions"]!["m"]!.GetValue<int>());
        Assert.Equal(2, created["dimensions"]!["p"]!.GetValue<int>());
        Assert.Equal(10, created["dimensions"]!["horizon"]!.GetValue<int>());
        Assert.Equal(10, created["dimensions"]!["decisionVariables"]!.GetValue<int>());
        Assert.NotNull(created["diagnostics"]!["closedLoopSpectralRadius"]);
        Assert.NotNull(created["warnings"]);
        Assert.Null(created["discreteA"]);

        var again = await client.PostJsonAsync("/v1/models", TestModels.DoubleIntegrator);
        Assert.Equal(HttpStatusCode.OK, again.StatusCode);
        var known = await again.ReadJsonAsync();
        Assert.Equal(id, known["id"]!.GetValue<string>());
        Assert.False(known["created"]!.GetValue<bool>());
    }

    [Fact]
    public async Task A_continuous_plant_is_answered_with_its_discretised_a_and_b()
    {
        await using var factory = new LookaheadFactory();
        var response = await factory.CreateClient().PostJsonAsync("/v1/models", TestModels.TwoTanks);
        var body = await response.ReadJsonAsync();

        Assert.Equal(HttpStatusCode.Created, response.StatusCode);
        var a = body["discreteA"]!.Matrix();
        Assert.Equal(2, a.Length);
        Assert.InRange(a[0][0], 0.89, 0.91); // e^(−0.02·5) ≈ 0.905 plus coupling
        Assert.Equal(2, body["discreteB"]!.Matrix()[0].Length);
    }

    [Fact]
    public async Task The_id_ignores_key_order_whitespace_and_number_formatting()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        const string Reordered = """
            {"cost":{"inputWeight":[1e-2],"outputWeight":[1,1.0E-1],"horizon":10},
                 "plant":   {"timeDomain":"discrete","sampleTime":1e-1,"b":[[5e-3],[0.10]],"a":[[1,0.1],[0,1.000]]},
             "name":"double-integrator"}
            """;
        string same = await client.RegisterAsync(Reordered, HttpStatusCode.OK);

        Assert.Equal(id, same);
    }

    [Fact]
    public async Task Stating_the_default_riccati_terminal_weight_gives_the_same_id_as_omitting_it()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);
        var explicitDefault = TestModels.Node(TestModels.DoubleIntegrator);
        explicitDefault["cost"]!["terminalWeight"] = "riccati";

        Assert.Equal(id, await client.RegisterAsync(explicitDefault.ToJsonString(), HttpStatusCode.OK));
    }

    [Fact]
    public async Task Any_numeric_change_changes_the_id()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);
        var changed = TestModels.Node(TestModels.DoubleIntegrator);
        changed["cost"]!["inputWeight"]![0] = 0.010000000000000002;

        string other = await client.RegisterAsync(changed.ToJsonString());

        Assert.NotEqual(id, other);
    }

    [Fact]
    public async Task An_unknown_field_is_refused_with_400_naming_its_path()
    {
        await using var factory = new LookaheadFactory();
        var typo = TestModels.Node(TestModels.DoubleIntegrator);
        typo["cost"]!["horizn"] = 12;

        var errors = await (await factory.CreateClient().PostJsonAsync("/v1/models", typo)).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.Contains(errors, e => e.Path == "cost.horizn" && e.Reason.Contains("not a known field", StringComparison.Ordinal));
    }

    [Fact]
    public async Task A_weight_of_the_wrong_size_is_refused_with_400_naming_cost_inputWeight()
    {
        await using var factory = new LookaheadFactory();
        var model = TestModels.Node(TestModels.DoubleIntegrator);
        model["cost"]!["inputWeight"] = new JsonArray(1.0, 2.0);

        var errors = await (await factory.CreateClient().PostJsonAsync("/v1/models", model)).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.Contains(errors, e => e.Path == "cost.inputWeight");
    }

    [Fact]
    public async Task A_matrix_with_a_short_row_is_refused_naming_the_row()
    {
        await using var factory = new LookaheadFactory();
        var model = TestModels.Node(TestModels.DoubleIntegrator);
        model["plant"]!["a"]![1] = new JsonArray(1.0);

        var errors = await (await factory.CreateClient().PostJsonAsync("/v1/models", model)).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.Contains(errors, e => e.Path == "plant.a[1]");
    }

    [Fact]
    public async Task A_missing_time_domain_is_refused_rather_than_assumed()
    {
        await using var factory = new LookaheadFactory();
        var model = TestModels.Node(TestModels.DoubleIntegrator);
        model["plant"]!.AsObject().Remove("timeDomain");

        var errors = await (await factory.CreateClient().PostJsonAsync("/v1/models", model)).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.Contains(errors, e => e.Path == "plant.timeDomain");
    }

    [Theory]
    [InlineData("""{"plant":{"a":[[NaN]]}}""")]
    [InlineData("""{"plant":{"a":[["1"]]}}""")]
    [InlineData("""{"plant": """)]
    [InlineData("""{"name":"x",}""")]
    [InlineData("")]
    public async Task Invalid_json_or_non_numbers_are_refused_with_400_not_500(string body)
    {
        await using var factory = new LookaheadFactory();
        var response = await factory.CreateClient().PostJsonAsync("/v1/models", body);

        var errors = await response.ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.NotEmpty(errors);
    }

    [Fact]
    public async Task Invalid_json_reports_the_line_and_position()
    {
        await using var factory = new LookaheadFactory();
        var response = await factory.CreateClient().PostJsonAsync("/v1/models", "{\n  \"name\": \"x\",\n  \"plant\": nope\n}");
        var problem = await response.ReadJsonAsync();

        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        Assert.Equal(3, problem["line"]!.GetValue<long>());
        Assert.NotNull(problem["position"]);
    }

    [Fact]
    public async Task JSON_nested_deeper_than_the_limit_is_refused()
    {
        await using var factory = new LookaheadFactory();
        string deep = "{\"name\":" + new string('[', 40) + new string(']', 40) + "}";

        var errors = await (await factory.CreateClient().PostJsonAsync("/v1/models", deep)).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.NotEmpty(errors);
    }

    [Fact]
    public async Task A_body_over_the_limit_is_refused_with_413_before_it_is_parsed()
    {
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Limits:MaxBodyBytes"] = "4096" });
        var client = factory.CreateClient();

        // Not JSON at all: had the body been parsed, the answer would be 400 (malformed JSON), not 413.
        byte[] notJson = Encoding.UTF8.GetBytes("{" + new string('x', 8000));
        var withLength = new ByteArrayContent(notJson);
        withLength.Headers.ContentType = new MediaTypeHeaderValue("application/json");
        var chunked = new StreamContent(new UnknownLengthStream(notJson));
        chunked.Headers.ContentType = new MediaTypeHeaderValue("application/json");

        await (await client.PostAsync("/v1/models", withLength)).ReadProblemAsync(HttpStatusCode.RequestEntityTooLarge);
        await (await client.PostAsync("/v1/models", chunked)).ReadProblemAsync(HttpStatusCode.RequestEntityTooLarge);

        // The same text under the limit is parsed, and refused as malformed.
        var small = new ByteArrayContent(notJson.AsSpan(0, 100).ToArray());
        small.Headers.ContentType = new MediaTypeHeaderValue("application/json");
        await (await client.PostAsync("/v1/models", small)).ReadProblemAsync(HttpStatusCode.BadRequest);
    }

    /// <summary>A body whose length is not known up front, so it is sent chunked and counted as it arrives.</summary>
    private sealed class UnknownLengthStream(byte[] data) : MemoryStream(data)
    {
        public override bool CanSeek => false;
    }

    [Fact]
    public async Task An_array_longer_than_any_model_allows_is_refused_while_parsing()
    {
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Limits:MaxArrayLength"] = "100" });
        var model = TestModels.Node(TestModels.DoubleIntegrator);
        model["cost"]!["outputWeight"] = new JsonArray(Enumerable.Range(0, 101).Select(_ => (JsonNode?)JsonValue.Create(1.0)).ToArray());

        var errors = await (await factory.CreateClient().PostJsonAsync("/v1/models", model)).ReadProblemAsync(HttpStatusCode.BadRequest);

        Assert.Contains(errors, e => e.Path == "cost.outputWeight" && e.Reason.Contains("100", StringComparison.Ordinal));
    }

    [Fact]
    public async Task A_body_that_is_not_json_is_refused_with_415()
    {
        await using var factory = new LookaheadFactory();

        var response = await factory.CreateClient().PostAsync("/v1/models", TestModels.DoubleIntegrator, "text/plain");

        await response.ReadProblemAsync(HttpStatusCode.UnsupportedMediaType);
    }

    [Fact]
    public async Task A_malformed_id_is_400_and_an_unknown_id_is_404()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();

        var malformed = await (await client.GetAsync("/v1/models/not-a-hash")).ReadProblemAsync(HttpStatusCode.BadRequest);
        await (await client.GetAsync("/v1/models/" + new string('A', 64))).ReadProblemAsync(HttpStatusCode.BadRequest);
        var unknown = await (await client.GetAsync("/v1/models/" + new string('0', 64))).ReadProblemAsync(HttpStatusCode.NotFound);

        Assert.Contains(malformed, e => e.Path == "id");
        Assert.Contains(unknown, e => e.Path == "id");
    }

    [Fact]
    public async Task A_registered_model_reads_back_as_its_canonical_document_with_diagnostics()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.TwoTanks);

        var details = await (await client.GetAsync($"/v1/models/{id}")).ReadJsonAsync();

        Assert.Equal(id, details["id"]!.GetValue<string>());
        Assert.Equal("two-tanks", details["document"]!["name"]!.GetValue<string>());
        Assert.Equal("stage", details["document"]!["cost"]!["terminalWeight"]!.GetValue<string>());
        Assert.Equal(2, details["document"]!["cost"]!["outputWeight"]!.AsArray().Count);
        Assert.Equal(["valve_1", "valve_2"], details["document"]!["labels"]!["inputs"]!.AsArray().Select(v => v!.GetValue<string>()));
        Assert.NotNull(details["diagnostics"]!["controllable"]);
        Assert.NotNull(details["discreteA"]);
    }

    [Fact]
    public async Task Listing_pages_through_models_in_registration_order()
    {
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Demo:Enabled"] = "false" });
        var client = factory.CreateClient();
        var ids = new List<string>();
        for (int h = 2; h <= 6; h++)
        {
            var model = TestModels.Node(TestModels.DoubleIntegrator);
            model["cost"]!["horizon"] = h;
            ids.Add(await client.RegisterAsync(model.ToJsonString()));
        }

        var first = await (await client.GetAsync("/v1/models?offset=0&limit=2")).ReadJsonAsync();
        var second = await (await client.GetAsync("/v1/models?offset=2&limit=2")).ReadJsonAsync();
        var listed = first["items"]!.AsArray().Concat(second["items"]!.AsArray()).Select(i => i!["id"]!.GetValue<string>()).ToList();

        Assert.Equal(5, first["total"]!.GetValue<long>());
        Assert.Equal(ids.Take(4), listed);
        Assert.Equal(4, second["items"]![0]!["dimensions"]!["decisionVariables"]!.GetValue<int>());
        await (await client.GetAsync("/v1/models?limit=0")).ReadProblemAsync(HttpStatusCode.BadRequest);
        var notANumber = await (await client.GetAsync("/v1/models?offset=abc")).ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(notANumber, e => e.Path == "offset");
    }

    [Fact]
    public async Task Deleting_a_model_returns_204_and_then_it_is_gone()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        Assert.Equal(HttpStatusCode.NoContent, (await client.DeleteAsync($"/v1/models/{id}")).StatusCode);

        await (await client.GetAsync($"/v1/models/{id}")).ReadProblemAsync(HttpStatusCode.NotFound);
        await (await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[1,0]}""")).ReadProblemAsync(HttpStatusCode.NotFound);
        await (await client.DeleteAsync($"/v1/models/{id}")).ReadProblemAsync(HttpStatusCode.NotFound);
    }

    [Fact]
    public async Task An_unknown_route_is_a_problem_document_too()
    {
        await using var factory = new LookaheadFactory();

        await (await factory.CreateClient().GetAsync("/v1/nothing-here")).ReadProblemAsync(HttpStatusCode.NotFound);
    }
}
