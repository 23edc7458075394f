using System.Text.Json;
using Lookahead.Core.Models;

namespace Lookahead.Core.Tests.Support;

/// <summary>Reads the JSON fixtures written by tests/reference/generate_fixtures.py.</summary>
public static class Fixtures
{
    public static JsonElement Load(string file)
    {
        var path = Path.Combine(AppContext.BaseDirectory, "Fixtures", file);
        using var stream = File.OpenRead(path);
        using var document = JsonDocument.Parse(stream);
        return document.RootElement.Clone();
    }

    public static IEnumerable<object[]> CaseNames(string file) =>
        Load(file).GetProperty("cases").EnumerateArray().Select(c => new object[] { c.GetProperty("name").GetString()! });

    public static JsonElement Case(string file, string name) =>
        Load(file).GetProperty("cases").EnumerateArray().Single(c => c.GetProperty("name").GetString() == name);

    public static string Source(string file) => Load(file).GetProperty("source").GetString()!;

    public static double[] Vector(this JsonElement e) => e.EnumerateArray().Select(v => v.GetDouble()).ToArray();

    public static double?[] NullableVector(this JsonElement e) =>
        e.EnumerateArray().Select(v => v.ValueKind == JsonValueKind.Null ? (double?)null : v.GetDouble()).ToArray();

    public static double[][] Matrix(this JsonElement e) => e.EnumerateArray().Select(Vector).ToArray();

    public static double[]? OptionalVector(this JsonElement e, string property) =>
        e.TryGetProperty(property, out var v) && v.ValueKind != JsonValueKind.Null ? v.Vector() : null;

    /// <summary>The "model" object of a plan fixture as a core document.</summary>
    public static ModelDocument Model(this JsonElement c)
    {
        var model = c.GetProperty("model");
        var plant = model.GetProperty("plant");
        var cost = model.GetProperty("cost");
        var domain = plant.GetProperty("timeDomain").GetString() == "continuous" ? TimeDomain.Continuous : TimeDomain.Discrete;
        var plantSpec = new PlantSpec(
            plant.GetProperty("a").Matrix(),
            plant.GetProperty("b").Matrix(),
            plant.TryGetProperty("c", out var cm) ? cm.Matrix() : null,
            plant.GetProperty("sampleTime").GetDouble(),
            domain,
            plant.TryGetProperty("e", out var e) ? e.Matrix() : null);
        var costSpec = new CostSpec(
            cost.GetProperty("horizon").GetInt32(),
            Weight(cost.GetProperty("outputWeight")),
            Weight(cost.GetProperty("inputWeight")),
            cost.TryGetProperty("inputRateWeight", out var s) ? Weight(s) : null,
            cost.TryGetProperty("terminalWeight", out var t) ? Terminal(t) : null);
        LimitsSpec? limits = null;
        if (model.TryGetProperty("limits", out var l) || c.TryGetProperty("limits", out l))
        {
            double?[]? Get(string name) => l.TryGetProperty(name, out var v) ? v.NullableVector() : null;
            limits = new LimitsSpec(Get("inputMin"), Get("inputMax"), Get("inputRateMin"), Get("inputRateMax"), Get("outputMin"), Get("outputMax"),
                l.TryGetProperty("outputViolationWeight", out var w) ? w.Vector() : null);
        }

        return new ModelDocument(c.GetProperty("name").GetString(), plantSpec, costSpec, limits);
    }

    public static WeightSpec Weight(JsonElement e) =>
        e[0].ValueKind == JsonValueKind.Array ? WeightSpec.FromMatrix(e.Matrix()) : WeightSpec.FromDiagonal(e.Vector());

    private static TerminalWeightSpec Terminal(JsonElement e) => e.ValueKind switch
    {
        JsonValueKind.String when e.GetString() == "riccati" => TerminalWeightSpec.Riccati,
        JsonValueKind.String when e.GetString() == "stage" => TerminalWeightSpec.Stage,
        _ => new TerminalWeightSpec(TerminalWeightKind.Explicit, e.Matrix()),
    };
}
