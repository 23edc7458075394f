using System.Net;
using System.Text;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>
/// What the hostile corpus found, one request each: answers that were 500s, inputs that were accepted although they
/// are garbage, and refusals that named a field the request does not have.
/// </summary>
public class HostileFindingsTests
{
    private static async Task<(LookaheadFactory Factory, HttpClient Client)> StartAsync()
    {
        var factory = new LookaheadFactory();
        return (factory, factory.CreateClient());
    }

    [Theory]
    [InlineData("name", "cold\u0000store")]
    [InlineData("name", "\u001b[31mred")]
    [InlineData("labels.states[1]", "zone\u007f")]
    [InlineData("labels.outputs[0]", "zone_a\u0085")]
    [InlineData("labels.units.states[2]", "°C\n")]
    public async Task A_control_character_in_a_name_or_label_is_refused_naming_it(string path, string text)
    {
        var (factory, client) = await StartAsync();
        await using var _ = factory;

        var response = await client.PostJsonAsync("/v1/models", JsonEdit.WithRaw(JsonNode.Parse(TestModels.DemoDocument)!, path, JsonEdit.Quote(text)));

        var errors = await response.ReadProblemAsync(HttpStatusCode.BadRequest);
        Assert.Contains(errors, e => e.Path == path && e.Reason.Contains("control characters", StringComparison.Ordinal));
    }

    [Theory]
    [InlineData("5e-324")]
    [InlineData("1e-300")]
    [InlineData("1e-8")]
    [InlineData("1e300")]
    [InlineData("1e12")]
    public async Task A_subnormal_tiny_or_enormous_sample_time_is_refused_for_a_discrete_plant_too(string sampleTime)
    {
        var (factory, client) = await StartAsync();
        await using var _ = factory;

        var response = await client.PostJsonAsync("/v1/models", JsonEdit.WithRaw(JsonNode.Parse(TestModels.DoubleIntegrator)!, "plant.sampleTime", sampleTime));

        Assert.Contains(await response.ReadProblemAsync(HttpStatusCode.BadRequest), e => e.Path == "plant.sampleTime");
    }

    [Theory]
    [InlineData("""{"state":[0.5,-0.2],"\ud800":1}""")]
    [InlineData("""{"st\udc00ate":[0.5,-0.2]}""")]
    public async Task A_member_name_with_a_lone_surrogate_is_malformed_json_not_a_500(string body)
    {
        var (factory, client) = await StartAsync();
        await using var _ = factory;
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var response = await client.PostJsonAsync($"/v1/models/{id}/plan", body);

        Assert.NotEmpty(await response.ReadProblemAsync(HttpStatusCode.BadRequest));
        Assert.Contains("malformed-json", (await response.ReadJsonAsync())["type"]!.GetValue<string>(), StringComparison.Ordinal);
    }

    [Fact]
    public async Task A_member_name_that_is_not_utf8_is_malformed_json_in_a_plan_and_an_error_row_in_a_replay()
    {
        var (factory, client) = await StartAsync();
        await using var _ = factory;
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);
        byte[] Body(string before, string after) => [.. Encoding.UTF8.GetBytes(before), 0xc3, 0x28, .. Encoding.UTF8.GetBytes(after)];

        var plan = await client.PostAsync($"/v1/models/{id}/plan", Json(Body("""{"state":[0.5,-0.2],"x""", "\":1}")));
        Assert.NotEmpty(await plan.ReadProblemAsync(HttpStatusCode.BadRequest));

        var replay = await client.PostAsync($"/v1/models/{id}/plans", new ByteArrayContent(Body("{\"state\":[1,0]}\n{\"", "\":1}\n")) { Headers = { { "Content-Type", "application/x-ndjson" } } });
        var rows = ReplayAnswer.NdjsonResults(await replay.Content.ReadAsStringAsync());
        Assert.Equal(HttpStatusCode.OK, replay.StatusCode);
        Assert.Equal(["optimal", "error"], rows.Select(r => r["status"]!.GetValue<string>()));
    }

    [Theory]
    [InlineData("[1e400,-19.5]", "reference[0]")]
    [InlineData("[[-21,-19.5],[-21,1e309]]", "reference[1][1]")]
    public async Task A_step_setpoint_beyond_double_is_refused_naming_the_entry(string reference, string path)
    {
        var (factory, client) = await StartAsync();
        await using var _ = factory;
        await HostileTargets.CreateAsync(client);

        var body = JsonEdit.WithRaw(HostileTargets.StepBody(1, "2026-01-01T00:01:00Z"), "reference", reference);
        var response = await client.PostJsonAsync($"/v1/stations/{HostileTargets.Station}/step", body);

        Assert.Contains(await response.ReadProblemAsync(HttpStatusCode.BadRequest), e => e.Path == path);
        Assert.Equal(1, (await (await client.GetAsync($"/v1/stations/{HostileTargets.Station}")).ReadJsonAsync())["sequence"]!.GetValue<long>());
    }

    [Theory]
    [InlineData("state")]
    [InlineData("disturbance")]
    public async Task A_member_given_twice_inside_an_estimate_is_refused(string member)
    {
        var (factory, client) = await StartAsync();
        await using var _ = factory;
        string id = await client.RegisterAsync(HostileTargets.ZonesDocument);
        var plan = JsonNode.Parse("""{"estimate":{"state":[-20,-20.5],"disturbance":[0.1,-0.1]},"previousInput":[60,60]}""")!;

        var response = await client.PostJsonAsync($"/v1/models/{id}/plan", JsonEdit.WithExtraMember(plan, "estimate", member, "[0,0]"));

        Assert.Contains(await response.ReadProblemAsync(HttpStatusCode.BadRequest), e => e.Path == $"estimate.{member}" && e.Reason == "is given more than once");
    }

    [Theory]
    [InlineData("x")]
    [InlineData("{}")]
    [InlineData("]")]
    public async Task Content_after_a_json_replay_body_is_reported_as_an_error_row(string tail)
    {
        var (factory, client) = await StartAsync();
        await using var _ = factory;
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var response = await client.PostJsonAsync($"/v1/models/{id}/plans", """{"requests":[{"state":[1,0]},{"state":[0,1]}]}""" + tail);
        var answer = await response.ReadJsonAsync();

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal(["optimal", "optimal", "error"], answer["results"]!.AsArray().Select(r => r!["status"]!.GetValue<string>()));
        Assert.Equal(1, answer["failedRows"]!.GetValue<long>());
    }

    [Theory]
    [InlineData("0.4\u0000,-0.1")]
    [InlineData("0.4,-0.1\u0000")]
    [InlineData("\u00000.4,-0.1")]
    public async Task A_nul_in_a_csv_number_is_an_error_row_not_the_number_before_it(string row)
    {
        var (factory, client) = await StartAsync();
        await using var _ = factory;
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var response = await client.PostAsync($"/v1/models/{id}/plans", $"x1,x2\n0.5,-0.2\n{row}\n", "text/csv");
        var lines = ReplayAnswer.CsvLines(await response.Content.ReadAsStringAsync());

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Contains(",optimal,", lines[1], StringComparison.Ordinal);
        Assert.Contains(",error,", lines[2], StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("POST", "/health/live")]
    [InlineData("DELETE", "/health/ready")]
    [InlineData("PUT", "/metrics")]
    public async Task Health_and_metrics_refuse_methods_other_than_get_with_a_405_problem(string method, string path)
    {
        var (factory, client) = await StartAsync();
        await using var _ = factory;

        var response = await client.SendAsync(new HttpRequestMessage(new HttpMethod(method), path));

        await response.ReadProblemAsync(HttpStatusCode.MethodNotAllowed);
        Assert.Equal(HttpStatusCode.OK, (await client.SendAsync(new HttpRequestMessage(HttpMethod.Head, path))).StatusCode);
    }

    [Theory]
    [InlineData("""{"plant ":1}""", "plant ")]
    [InlineData("""{"plant":{"a b":1}}""", "plant.a b")]
    public async Task An_unknown_member_whose_name_needs_quoting_is_named_by_a_plain_path(string body, string path)
    {
        var (factory, client) = await StartAsync();
        await using var _ = factory;

        var response = await client.PostJsonAsync("/v1/models", body);

        Assert.Contains(await response.ReadProblemAsync(HttpStatusCode.BadRequest), e => e.Path == path);
    }

    [Fact]
    public async Task An_estimate_too_large_to_plan_is_named_as_the_estimate_not_as_a_state()
    {
        var (factory, client) = await StartAsync();
        await using var _ = factory;
        string id = await client.RegisterAsync(HostileTargets.ZonesDocument);

        var response = await client.PostJsonAsync($"/v1/models/{id}/plan", """{"estimate":{"state":[1e308,-20],"disturbance":[0,0]},"reference":[-21,-19.5],"previousInput":[60,60]}""");

        Assert.Contains(await response.ReadProblemAsync(HttpStatusCode.BadRequest), e => e.Path == "estimate.state");
    }

    // Before, a tracked reading of 1e308 was kept as the station's estimate and every later automatic step was refused.
    [Theory]
    [InlineData("measurement", "[1e308,-19.9]", "auto")]
    [InlineData("measurement", "[-20.4,-1e51]", "track")]
    [InlineData("appliedInput", "[1e308,59]", "track")]
    [InlineData("reference", "[-21,1e300]", "auto")]
    public async Task A_step_number_beyond_the_model_bound_is_refused_naming_it_and_the_station_keeps_its_state(string field, string value, string mode)
    {
        var (factory, client) = await StartAsync();
        await using var _ = factory;
        await HostileTargets.CreateAsync(client);
        var before = await (await client.GetAsync($"/v1/stations/{HostileTargets.Station}")).Content.ReadAsStringAsync();

        var body = JsonEdit.WithRaw(JsonEdit.With(HostileTargets.StepBody(1, "2026-01-01T00:01:00Z"), "mode", mode), field, value);
        var response = await client.PostJsonAsync($"/v1/stations/{HostileTargets.Station}/step", body);

        Assert.Contains(await response.ReadProblemAsync(HttpStatusCode.BadRequest), e => e.Path.StartsWith(field + "[", StringComparison.Ordinal) && e.Reason.Contains(Lookahead.Core.Validation.ModelValidator.MaxMagnitude.ToString("g3", System.Globalization.CultureInfo.CurrentCulture), StringComparison.Ordinal));
        Assert.Equal(before, await (await client.GetAsync($"/v1/stations/{HostileTargets.Station}")).Content.ReadAsStringAsync());
    }

    private static ByteArrayContent Json(byte[] body) => new(body) { Headers = { { "Content-Type", "application/json" } } };
}
