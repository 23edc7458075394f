using System.Text.Json;
using Lookahead.Core.Models;

namespace Lookahead.Core.Tests.Support;

/// <summary>
/// The service's demo model (src/Lookahead.Api/Demo/cold-store.json: three zones, three inputs, the outdoor
/// temperature as a measured disturbance, N = 30, hard input and rate limits, soft output limits, in engineering
/// units around its operating point), read from the repository so the tests follow the file, in its deviation form
/// (its estimator is left out: these tests plan from states), and seeded states over its operating range.
/// </summary>
internal static class DemoModel
{
    private static readonly Lazy<ModelDocument> Loaded = new(Load);

    public static ModelDocument Document => Loaded.Value;

    /// <summary>
    /// <paramref name="count"/> requests in four equal groups: cold zones (x_0 in [−3, 0] K from the −20 °C operating
    /// point) and warm zones (x_0 in [0, 3] K), each without and with a previous input drawn from the input window
    /// [0, 100] % (the operating point's inputs are 0 %, so they are the same in deviations).
    /// </summary>
    public static IReadOnlyList<Lookahead.Core.Planning.PlanRequest> States(int count, int seed)
    {
        var random = new Random(seed);
        var result = new List<Lookahead.Core.Planning.PlanRequest>(count);
        for (int i = 0; i < count; i++)
        {
            int group = i % 4;
            bool warm = group >= 2;
            bool previous = group % 2 == 1;
            var state = Enumerable.Range(0, 3).Select(_ => warm ? 3 * random.NextDouble() : -3 * random.NextDouble()).ToArray();
            double[]? input = previous ? Enumerable.Range(0, 3).Select(_ => 100 * random.NextDouble()).ToArray() : null;
            result.Add(new Lookahead.Core.Planning.PlanRequest(state, null, input));
        }

        return result;
    }

    private static ModelDocument Load()
    {
        var directory = new DirectoryInfo(AppContext.BaseDirectory);
        while (directory is not null && !File.Exists(Path.Combine(directory.FullName, "src", "Lookahead.Api", "Demo", "cold-store.json")))
        {
            directory = directory.Parent;
        }

        if (directory is null)
        {
            throw new FileNotFoundException("src/Lookahead.Api/Demo/cold-store.json was not found above the test assembly");
        }

        using var stream = File.OpenRead(Path.Combine(directory.FullName, "src", "Lookahead.Api", "Demo", "cold-store.json"));
        using var json = JsonDocument.Parse(stream);
        var root = json.RootElement;
        var plant = root.GetProperty("plant");
        var cost = root.GetProperty("cost");
        var limits = root.GetProperty("limits");
        double?[]? Get(string name) => limits.TryGetProperty(name, out var v) ? v.NullableVector() : null;

        // The file is in engineering units; these tests work on its deviation form (limits less the operating point,
        // no operating point), which is what the solvers inside see. OperatingPointTests check the conversion.
        var point = root.TryGetProperty("operatingPoint", out var op) ? op : default;
        double[]? inputOffset = point.ValueKind == JsonValueKind.Object ? point.OptionalVector("input") : null;
        double[]? outputOffset = point.ValueKind == JsonValueKind.Object ? point.OptionalVector("output") : null;
        return new ModelDocument(
            root.GetProperty("name").GetString(),
            new PlantSpec(
                plant.GetProperty("a").Matrix(),
                plant.GetProperty("b").Matrix(),
                plant.TryGetProperty("c", out var c) ? c.Matrix() : null,
                plant.GetProperty("sampleTime").GetDouble(),
                plant.GetProperty("timeDomain").GetString() == "continuous" ? TimeDomain.Continuous : TimeDomain.Discrete,
                plant.TryGetProperty("e", out var e) ? e.Matrix() : null),
            new CostSpec(
                cost.GetProperty("horizon").GetInt32(),
                Fixtures.Weight(cost.GetProperty("outputWeight")),
                Fixtures.Weight(cost.GetProperty("inputWeight")),
                cost.TryGetProperty("inputRateWeight", out var s) ? Fixtures.Weight(s) : null,
                cost.GetProperty("terminalWeight").GetString() == "riccati" ? TerminalWeightSpec.Riccati : throw new InvalidDataException("the demo's terminal weight is expected to be 'riccati'")),
            new LimitsSpec(
                Shift(Get("inputMin"), inputOffset),
                Shift(Get("inputMax"), inputOffset),
                Get("inputRateMin"),
                Get("inputRateMax"),
                Shift(Get("outputMin"), outputOffset),
                Shift(Get("outputMax"), outputOffset),
                limits.GetProperty("outputViolationWeight").Vector()));
    }

    private static double?[]? Shift(double?[]? bounds, double[]? offset) =>
        bounds is null || offset is null ? bounds : bounds.Select((b, i) => b - offset[i]).ToArray();
}
