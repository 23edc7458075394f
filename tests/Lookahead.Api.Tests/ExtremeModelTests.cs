using System.Net;
using System.Text;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// Models with finite numbers at the edges of the double range are answered with a 400 problem naming the field.
/// Each registration, and the whole test with the service's shutdown, carries a generous deadline so that a
/// hang fails the test instead of blocking the run (a compile spinning on a core also holds up shutdown).
/// </summary>
public class ExtremeModelTests
{
    private static readonly TimeSpan Deadline = TimeSpan.FromSeconds(60);

    /// <summary>Registers <paramref name="model"/> on a fresh service and returns the problem's errors.</summary>
    private static Task<List<(string Path, string Reason)>> RefusedAsync(JsonNode model) =>
        WithinDeadline(async () =>
        {
            await using var factory = new LookaheadFactory();
            return await (await RegisterAsync(factory, model)).ReadProblemAsync(HttpStatusCode.BadRequest);
        });

    private static async Task<HttpResponseMessage> RegisterAsync(LookaheadFactory factory, JsonNode model)
    {
        using var deadline = new CancellationTokenSource(Deadline);
        using var content = new StringContent(model.ToJsonString(), Encoding.UTF8, "application/json");
        return await factory.CreateClient().PostAsync("/v1/models", content, deadline.Token);
    }

    private static Task<T> WithinDeadline<T>(Func<Task<T>> test) => Task.Run(test).WaitAsync(Deadline + Deadline);

    private static JsonNode Continuous()
    {
        var model = TestModels.Node(TestModels.TwoTanks);
        model["cost"]!.AsObject().Remove("terminalWeight");
        return model;
    }

    public static TheoryData<string, bool, string, string> Cases => new()
    {
        { "1e308 in A, discrete", false, """{"plant":{"a":[[1e308,0.1],[0,1]]}}""", "plant.a" },
        { "1e308 in A, continuous", true, """{"plant":{"a":[[1e308,0.01],[0.01,-0.03]]}}""", "plant.a" },
        { "1e308 in B, discrete", false, """{"plant":{"b":[[1e308],[0.1]]}}""", "plant.b" },
        { "1e308 in B, continuous", true, """{"plant":{"b":[[1e308,0],[0,0.04]]}}""", "plant.b" },
        { "sample time 1e-300, continuous", true, """{"plant":{"sampleTime":1e-300}}""", "plant.sampleTime" },
        { "sample time 1e300, continuous", true, """{"plant":{"sampleTime":1e300}}""", "plant.sampleTime" },
        { "huge output weight, discrete", false, """{"cost":{"outputWeight":[1e308,1]}}""", "cost.outputWeight" },
        { "huge output weight, continuous", true, """{"cost":{"outputWeight":[[1e308,0],[0,1e308]]}}""", "cost.outputWeight" },
    };

    [Theory]
    [MemberData(nameof(Cases))]
    public async Task Registration_answers_400_naming_the_field(string name, bool continuous, string patch, string field)
    {
        // Patches apply to the discrete double integrator or to the continuous two-tank plant.
        var model = continuous ? Continuous() : TestModels.Node(TestModels.DoubleIntegrator);
        Merge(model, JsonNode.Parse(patch)!);

        var errors = await RefusedAsync(model);

        Assert.True(
            errors.Any(e => e.Path == field || e.Path.StartsWith(field + "[", StringComparison.Ordinal)),
            $"{name}: expected an error at {field}, got {string.Join("; ", errors.Select(e => $"{e.Path}: {e.Reason}"))}");
    }

    [Fact]
    public async Task A_tiny_but_positive_definite_input_weight_is_accepted()
    {
        var model = TestModels.Node(TestModels.DoubleIntegrator);
        model["cost"]!["inputWeight"] = new JsonArray(1e-10);

        var status = await WithinDeadline(async () =>
        {
            await using var factory = new LookaheadFactory();
            return (await RegisterAsync(factory, model)).StatusCode;
        });

        Assert.Equal(HttpStatusCode.Created, status);
    }

    [Fact]
    public async Task An_input_weight_with_a_negative_eigenvalue_is_refused_saying_it_is_judged_relatively()
    {
        var model = Continuous();
        model["cost"]!["inputWeight"] = new JsonArray(new JsonArray(2.1, 0.0), new JsonArray(0.0, -3e-5));

        var errors = await RefusedAsync(model);

        Assert.Contains(errors, e => e.Path == "cost.inputWeight" && e.Reason.Contains("relative to its largest eigenvalue", StringComparison.Ordinal));
    }

    // Two identical inputs and an input weight at the bottom of the double range: the Hessian cannot be factored.
    [Fact]
    public async Task An_input_weight_too_small_to_keep_the_hessian_factorable_is_a_400_naming_it()
    {
        var model = TestModels.Node(TestModels.DoubleIntegrator);
        model["plant"]!["b"] = new JsonArray(new JsonArray(0.005, 0.005), new JsonArray(0.1, 0.1));
        model["cost"]!["inputWeight"] = new JsonArray(1e-300, 1e-300);
        model["cost"]!["terminalWeight"] = "stage";

        var errors = await RefusedAsync(model);

        Assert.Contains(errors, e => e.Path == "cost.inputWeight");
    }

    private static void Merge(JsonNode target, JsonNode patch)
    {
        foreach (var (key, value) in patch.AsObject())
        {
            if (value is JsonObject inner && target[key] is JsonObject existing)
            {
                Merge(existing, inner);
            }
            else
            {
                target[key] = value?.DeepClone();
            }
        }
    }
}
