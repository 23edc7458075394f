using System.Text.Json;
using Lookahead.Core.Models;

namespace Lookahead.Benchmarks;

/// <summary>One entry of tests/reference/benchmark_models.json.</summary>
/// <param name="Name">The case name in the file.</param>
/// <param name="Document">The model (with the case's limits, if any) as a core document.</param>
/// <param name="State">The fixed initial state x_0.</param>
/// <param name="ReferenceInputs">The reference plan's inputs, row-major N×m.</param>
/// <param name="ActiveInputBoundCount">How many of the reference inputs sit on a bound (limited cases only).</param>
public sealed record ModelCase(string Name, ModelDocument Document, double[] State, double[] ReferenceInputs, int? ActiveInputBoundCount);

/// <summary>
/// Reads benchmark_models.json (copied next to the benchmark assembly by the project file).
/// Short keys: M1 = six-masses, M2 = random-4x2-N100, M3 = random-50x10-N50.
/// </summary>
public static class BenchmarkModels
{
    public const string FileName = "benchmark_models.json";

    public const string SixMasses = "six-masses";
    public const string SixMassesInputLimits = "six-masses-input-limits";
    public const string SixMassesInputAndRateLimits = "six-masses-input-and-rate-limits";
    public const string Random4x2 = "random-4x2-N100";
    public const string Random50x10 = "random-50x10-N50";

    private static readonly Lazy<IReadOnlyDictionary<string, ModelCase>> Cases = new(LoadAll);

    /// <summary>The case for a short key (M1, M2, M3) or a full case name.</summary>
    public static ModelCase Get(string key)
    {
        string name = key switch
        {
            "M1" => SixMasses,
            "M2" => Random4x2,
            "M3" => Random50x10,
            _ => key,
        };

        return Cases.Value.TryGetValue(name, out var found)
            ? found
            : throw new ArgumentException($"no benchmark case '{key}' in {FileName}", nameof(key));
    }

    public static IEnumerable<ModelCase> All => Cases.Value.Values;

    private static Dictionary<string, ModelCase> LoadAll()
    {
        var path = Path.Combine(AppContext.BaseDirectory, FileName);
        if (!File.Exists(path))
        {
            throw new FileNotFoundException($"{FileName} was not copied next to the benchmark assembly", path);
        }

        using var stream = File.OpenRead(path);
        using var json = JsonDocument.Parse(stream);
        var result = new Dictionary<string, ModelCase>(StringComparer.Ordinal);
        foreach (var c in json.RootElement.GetProperty("cases").EnumerateArray())
        {
            var parsed = Parse(c);
            result.Add(parsed.Name, parsed);
        }

        return result;
    }

    private static ModelCase Parse(JsonElement c)
    {
        string name = c.GetProperty("name").GetString() ?? throw new InvalidDataException("a case has no name");
        var model = c.GetProperty("model");
        var plant = model.GetProperty("plant");
        var cost = model.GetProperty("cost");
        var domain = plant.GetProperty("timeDomain").GetString() == "continuous" ? TimeDomain.Continuous : TimeDomain.Discrete;
        var plantSpec = new PlantSpec(
            Matrix(plant.GetProperty("a")),
            Matrix(plant.GetProperty("b")),
            plant.TryGetProperty("c", out var cm) && cm.ValueKind != JsonValueKind.Null ? Matrix(cm) : null,
            plant.GetProperty("sampleTime").GetDouble(),
            domain);
        var costSpec = new CostSpec(
            cost.GetProperty("horizon").GetInt32(),
            Weight(cost.GetProperty("outputWeight")),
            Weight(cost.GetProperty("inputWeight")),
            cost.TryGetProperty("inputRateWeight", out var s) && s.ValueKind != JsonValueKind.Null ? Weight(s) : null,
            cost.TryGetProperty("terminalWeight", out var t) ? Terminal(t) : null);

        LimitsSpec? limits = null;
        if (model.TryGetProperty("limits", out var l) || c.TryGetProperty("limits", out l))
        {
            double?[]? Get(string property) => l.TryGetProperty(property, out var v) && v.ValueKind != JsonValueKind.Null ? NullableVector(v) : null;
            limits = new LimitsSpec(
                Get("inputMin"),
                Get("inputMax"),
                Get("inputRateMin"),
                Get("inputRateMax"),
                Get("outputMin"),
                Get("outputMax"),
                l.TryGetProperty("outputViolationWeight", out var w) ? Vector(w) : null);
        }

        var inputs = c.GetProperty("inputs").EnumerateArray().SelectMany(row => row.EnumerateArray().Select(v => v.GetDouble())).ToArray();
        int? activeCount = c.TryGetProperty("activeInputBoundCount", out var a) ? a.GetInt32() : null;
        return new ModelCase(name, new ModelDocument(name, plantSpec, costSpec, limits), Vector(c.GetProperty("state")), inputs, activeCount);
    }

    private static double[] Vector(JsonElement e) => e.EnumerateArray().Select(v => v.GetDouble()).ToArray();

    private static double?[] NullableVector(JsonElement e) =>
        e.EnumerateArray().Select(v => v.ValueKind == JsonValueKind.Null ? (double?)null : v.GetDouble()).ToArray();

    private static double[][] Matrix(JsonElement e) => e.EnumerateArray().Select(Vector).ToArray();

    private static WeightSpec Weight(JsonElement e) =>
        e[0].ValueKind == JsonValueKind.Array ? WeightSpec.FromMatrix(Matrix(e)) : WeightSpec.FromDiagonal(Vector(e));

    private static TerminalWeightSpec Terminal(JsonElement e) => e.ValueKind switch
    {
        JsonValueKind.String when e.GetString() == "riccati" => TerminalWeightSpec.Riccati,
        JsonValueKind.String when e.GetString() == "stage" => TerminalWeightSpec.Stage,
        JsonValueKind.String => throw new InvalidDataException($"unknown terminal weight '{e.GetString()}'"),
        _ => new TerminalWeightSpec(TerminalWeightKind.Explicit, Matrix(e)),
    };
}
