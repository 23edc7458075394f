using System.Text;
using System.Text.Json;
using System.Text.Json.Nodes;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>
/// Registrations of broken model documents, each made from a target's valid document by one change. Registration
/// stores what it accepts, so every change here must be refused: where a value could be valid (a limit of 1e308, a
/// weight of 5e-324 on a single input) it is only used where the document makes it invalid.
/// </summary>
public static class ModelDocumentMutations
{
    /// <summary>Positions sampled from a model this size or larger, per value, instead of every one.</summary>
    private const int SampledPositions = 24;

    private static readonly string[] RequiredMembers =
        ["plant", "cost", "plant.a", "plant.b", "plant.sampleTime", "cost.horizon", "cost.outputWeight", "cost.inputWeight"];

    private static readonly HttpMethod Post = HttpMethod.Post;

    public static IEnumerable<HostileRequest> Generate(HostileTargets targets, Random random)
    {
        foreach (var model in targets.Models)
        {
            var document = model.Document;
            foreach (var request in Numbers(document, random))
            {
                yield return request;
            }

            foreach (var request in SampleTimesAndHorizons(document))
            {
                yield return request;
            }

            foreach (var request in Texts(document))
            {
                yield return request;
            }

            foreach (var request in Structure(document))
            {
                yield return request;
            }
        }

        foreach (var request in Sizes(targets.Models[0].Document))
        {
            yield return request;
        }
    }

    private static HostileRequest Register(string family, string body, Expectation expect) =>
        HostileRequest.Json(family, Post, "/v1/models", body, expect);

    private static IEnumerable<HostileRequest> Numbers(JsonNode document, Random random)
    {
        var positions = JsonEdit.NumberPaths(document).Where(p => p is not "plant.sampleTime" and not "cost.horizon").ToList();
        bool large = positions.Count > 100;
        IEnumerable<string> Sample() => large ? positions.OrderBy(_ => random.Next()).Take(SampledPositions).ToList() : positions;

        foreach (var value in HostileValues.Malformed)
        {
            foreach (var path in Sample())
            {
                yield return Register("model-number-malformed", JsonEdit.WithRaw(document, path, value), Expectation.BadRequest);
            }
        }

        foreach (var value in HostileValues.Overflowing)
        {
            foreach (var path in Sample())
            {
                yield return Register("model-number-overflow", JsonEdit.WithRaw(document, path, value), Expectation.BadField(path));
            }
        }

        // An array in place of a weight's first entry makes the service read the weight as a matrix and blame a later
        // entry, so the whole vector is what must be named; [1] for a weight of one entry is a valid 1×1 matrix.
        foreach (var value in HostileValues.WrongKinds)
        {
            foreach (var path in Sample().Where(p => !(value == "[1]" && IsSoleWeightEntry(document, p))))
            {
                yield return Register("model-number-wrong-kind", JsonEdit.WithRaw(document, path, value), Expectation.BadField(path[..path.LastIndexOf('[')]));
            }
        }

        // JSON null is "no bound" in a limit; everywhere else a number is required.
        foreach (var path in Sample().Where(p => !p.StartsWith("limits.", StringComparison.Ordinal)))
        {
            yield return Register("model-number-wrong-kind", JsonEdit.WithRaw(document, path, "null"), Expectation.BadField(path));
        }

        foreach (var value in HostileValues.Huge)
        {
            bool positive = !value.StartsWith('-');
            foreach (var path in Sample().Where(p => HugeIsInvalid(document, p, positive)))
            {
                yield return Register("model-number-huge", JsonEdit.WithRaw(document, path, value), Expectation.BadField(LimitPair(path) ?? path));
            }
        }

        // A zero input weight or measurement-noise variance is not positive definite; 1e-400 is that zero.
        foreach (var path in positions.Where(p => p.StartsWith("cost.inputWeight[", StringComparison.Ordinal) && IsDiagonal(p) || p.StartsWith("estimator.measurementNoise[", StringComparison.Ordinal) && IsDiagonal(p)))
        {
            yield return Register("model-number-tiny", JsonEdit.WithRaw(document, path, "1e-400"), Expectation.BadField(path[..path.IndexOf('[')]));
        }
    }

    private static bool IsSoleWeightEntry(JsonNode document, string path) =>
        (path.StartsWith("cost.", StringComparison.Ordinal) || path.StartsWith("estimator.", StringComparison.Ordinal))
        && JsonEdit.At(document, path[..path.LastIndexOf('[')]) is JsonArray { Count: 1 };

    /// <summary>A diagonal entry: "w[i]" of a vector or "w[i][i]" of a matrix.</summary>
    private static bool IsDiagonal(string path)
    {
        var indices = path[path.IndexOf('[')..].Split(['[', ']'], StringSplitOptions.RemoveEmptyEntries);
        return indices.Length == 1 || indices[0] == indices[1];
    }

    /// <summary>
    /// ±1e308 is refused everywhere in a model except a limit, where only the side that crosses its partner (or makes
    /// a rate limit forbid holding the input) is certainly invalid.
    /// </summary>
    private static bool HugeIsInvalid(JsonNode document, string path, bool positive)
    {
        if (!path.StartsWith("limits.", StringComparison.Ordinal) || path.StartsWith("limits.outputViolationWeight", StringComparison.Ordinal))
        {
            return true;
        }

        if (path.StartsWith("limits.inputRateMin", StringComparison.Ordinal))
        {
            return positive;
        }

        if (path.StartsWith("limits.inputRateMax", StringComparison.Ordinal))
        {
            return !positive;
        }

        bool isMin = path.Contains("Min[", StringComparison.Ordinal);
        return isMin == positive && LimitPair(path) is { } pair && JsonEdit.At(document, pair.Replace(isMin ? "Min" : "Max", isMin ? "Max" : "Min", StringComparison.Ordinal)) is JsonValue;
    }

    /// <summary>For an input or output limit, the entry whose order the service reports: the min ("is above the max").</summary>
    private static string? LimitPair(string path)
    {
        if (!path.StartsWith("limits.", StringComparison.Ordinal) || path.Contains("Rate", StringComparison.Ordinal) || path.Contains("Violation", StringComparison.Ordinal))
        {
            return null;
        }

        return path.Replace("Max[", "Min[", StringComparison.Ordinal);
    }

    private static IEnumerable<HostileRequest> SampleTimesAndHorizons(JsonNode document)
    {
        // Subnormal, zero, negative, enormous or not a number at all: none is a sample time.
        foreach (var value in new[] { "1e-400", "5e-324", "-5e-324", "2.2250738585072014e-308", "1e-300", "0", "-0.0", "-1", "1e300", "1e308", "1.7976931348623157e308", "1e400", "NaN", "Infinity", "\"60\"", "null", "[60]" })
        {
            var expect = HostileValues.Malformed.Contains(value) ? Expectation.BadRequest : Expectation.BadField("plant.sampleTime");
            yield return Register("model-sample-time", JsonEdit.WithRaw(document, "plant.sampleTime", value), expect);
        }

        foreach (var value in new[] { "1e-400", "0", "-1", "1.5", "1e10", "2147483648", "-2147483649", "501", "5e-324", "1e400", "\"10\"", "null", "true", "NaN" })
        {
            var expect = HostileValues.Malformed.Contains(value) ? Expectation.BadRequest : Expectation.BadField("cost.horizon");
            yield return Register("model-horizon", JsonEdit.WithRaw(document, "cost.horizon", value), expect);
        }
    }

    /// <summary>Names and labels with control characters, lone surrogates or bytes that are not UTF-8.</summary>
    private static IEnumerable<HostileRequest> Texts(JsonNode document)
    {
        var texts = JsonEdit.StringPaths(document)
            .Where(p => p == "name" || p.StartsWith("labels.", StringComparison.Ordinal))
            .DefaultIfEmpty("name")
            .Distinct()
            .ToList();
        if (!texts.Contains("name"))
        {
            texts.Insert(0, "name");
        }

        foreach (var path in texts)
        {
            string original = JsonEdit.At(document, path)?.GetValue<string>() ?? "hostile";
            foreach (var control in HostileValues.ControlCharacters)
            {
                foreach (var text in new[] { control + original, original[..(original.Length / 2)] + control + original[(original.Length / 2)..], original + control, control })
                {
                    yield return Register("model-control-character", JsonEdit.WithRaw(document, path, JsonEdit.Quote(text)), Expectation.BadField(path));
                }
            }

            foreach (var surrogate in new[] { "\ud800", "\udc00", original + "\udbff" })
            {
                yield return Register("model-invalid-text", JsonEdit.WithRaw(document, path, JsonEdit.Quote(surrogate)), Expectation.BadRequest);
            }

            foreach (var bytes in new byte[][] { [0xff], [0xc0, 0x80], [0xed, 0xa0, 0x80], [0xe2, 0x82], [0x00] })
            {
                string marked = JsonEdit.WithRaw(document, path, "\"@@bytes@@\"");
                int at = marked.IndexOf("@@bytes@@", StringComparison.Ordinal);
                var body = Encoding.UTF8.GetBytes(marked[..at]).Concat(bytes).Concat(Encoding.UTF8.GetBytes(marked[(at + 9)..])).ToArray();
                yield return new HostileRequest("model-invalid-text", Post, "/v1/models", "application/json", body, Expectation.BadRequest);
            }
        }
    }

    private static IEnumerable<HostileRequest> Structure(JsonNode document)
    {
        foreach (var objectPath in JsonEdit.ObjectPaths(document))
        {
            var target = (JsonObject)(objectPath.Length == 0 ? document : JsonEdit.At(document, objectPath)!);
            string Member(string name) => objectPath.Length == 0 ? name : $"{objectPath}.{name}";

            // Names are case-sensitive and exact: a near miss is refused, never ignored.
            foreach (var name in new[] { "unknown", "Plant", "plant ", "__proto__", "constructor" }.Where(n => !target.ContainsKey(n)))
            {
                yield return Register("model-unknown-member", JsonEdit.WithExtraMember(document, objectPath, name, "1"), Expectation.BadField(Member(name)));
            }

            foreach (var name in new[] { "", "\u0000", "\u001b[31m", "\ud800" })
            {
                yield return Register("model-unknown-member", JsonEdit.WithExtraMember(document, objectPath, name, "1"), Expectation.BadRequest);
            }

            if (target.Count > 0)
            {
                yield return Register("model-duplicate-member", JsonEdit.WithDuplicatedFirstMember(document, objectPath), Expectation.BadField(Member(target.First().Key)));
                string last = target.Last().Key;
                yield return Register("model-duplicate-member", JsonEdit.WithExtraMember(document, objectPath, last, target[last]?.ToJsonString() ?? "null"), Expectation.BadField(Member(last)));
            }

            foreach (var (name, value) in target.ToList())
            {
                if (value is null || value.GetValueKind() == JsonValueKind.Number)
                {
                    continue;
                }

                foreach (var other in HostileValues.OtherKinds(value.GetValueKind()))
                {
                    yield return Register("model-wrong-kind", JsonEdit.WithRaw(document, Member(name), other), Expectation.BadField(Member(name)));
                }
            }
        }

        foreach (var path in RequiredMembers)
        {
            yield return Register("model-missing-member", JsonEdit.Without(document, path).ToJsonString(), Expectation.BadField(path));
            yield return Register("model-missing-member", JsonEdit.WithRaw(document, path, "null"), Expectation.BadField(path));
        }

        foreach (var (path, value) in Arrays(document))
        {
            var array = (JsonArray)value;
            bool matrix = array.Count > 0 && array[0] is JsonArray;
            var shapes = new List<string> { "[]" };
            if (array.Count > 1 || matrix)
            {
                shapes.Add(JsonEdit.Without(value, $"[{array.Count - 1}]").ToJsonString());
            }

            var longer = array.DeepClone().AsArray();
            longer.Add(matrix ? array[0]!.DeepClone() : array[0]!.DeepClone());
            shapes.Add(longer.ToJsonString());
            if (matrix)
            {
                shapes.Add("[[]]");
                var ragged = array.DeepClone().AsArray();
                ragged[0]!.AsArray().Add(1.0);
                shapes.Add(ragged.ToJsonString());
                if (array.Count > 1)
                {
                    var shortRow = array.DeepClone().AsArray();
                    shortRow[array.Count - 1]!.AsArray().RemoveAt(0);
                    shapes.Add(shortRow.ToJsonString());
                }

                shapes.Add("[" + string.Join(",", Enumerable.Repeat("[1]", array.Count)) + ",1]");
            }

            foreach (var shape in shapes)
            {
                // C's rows are the outputs: one more or fewer and every per-output field is what no longer fits.
                bool outputsChanged = path == "plant.c" && shape.StartsWith("[[", StringComparison.Ordinal) && JsonNode.Parse(shape)!.AsArray().Count != array.Count;
                yield return Register("model-shape", JsonEdit.WithRaw(document, path, shape), outputsChanged ? Expectation.BadRequest : Expectation.BadField(path));
            }
        }

        var enums = new Dictionary<string, string[]>
        {
            ["plant.timeDomain"] = ["\"Discrete\"", "\"\"", "\" discrete\"", "\"discrete\\u0000\"", "\"analog\""],
            ["cost.terminalWeight"] = ["\"Riccati\"", "\"none\"", "\"\"", "\"stage\\u001b\""],
            ["estimator.disturbanceModel"] = ["\"sideways\"", "\"\"", "\"Output\"", "\"input\\u0000\""],
        };
        foreach (var (path, values) in enums)
        {
            if (path.StartsWith("estimator", StringComparison.Ordinal) && document["estimator"] is null)
            {
                continue;
            }

            foreach (var value in values)
            {
                yield return Register("model-enum", JsonEdit.WithRaw(document, path, value), Expectation.BadField(path));
            }
        }
    }

    /// <summary>Arrays that are whole fields (a matrix, a weight, a limit, a label list), not rows inside them.</summary>
    private static IEnumerable<(string Path, JsonNode Value)> Arrays(JsonNode document)
    {
        foreach (var objectPath in JsonEdit.ObjectPaths(document))
        {
            var target = (JsonObject)(objectPath.Length == 0 ? document : JsonEdit.At(document, objectPath)!);
            foreach (var (name, value) in target)
            {
                if (value is JsonArray)
                {
                    yield return (objectPath.Length == 0 ? name : $"{objectPath}.{name}", value);
                }
            }
        }
    }

    /// <summary>Just past each size limit: more states, a longer horizon, longer arrays, a bigger body.</summary>
    private static IEnumerable<HostileRequest> Sizes(JsonNode document)
    {
        string Identity(int n) => "[" + string.Join(",", Enumerable.Range(0, n).Select(i => "[" + string.Join(",", Enumerable.Range(0, n).Select(j => i == j ? "0.5" : "0")) + "]")) + "]";
        string Column(int n) => "[" + string.Join(",", Enumerable.Repeat("[1]", n)) + "]";
        string Ones(int n) => "[" + string.Join(",", Enumerable.Repeat("1", n)) + "]";

        yield return Register("model-size", "{\"plant\":{\"a\":" + Identity(201) + ",\"b\":" + Column(201) + ",\"sampleTime\":1,\"timeDomain\":\"discrete\"},\"cost\":{\"horizon\":5,\"outputWeight\":" + Ones(201) + ",\"inputWeight\":[1]}}", Expectation.BadField("plant.a"));
        yield return Register("model-size", JsonEdit.WithRaw(document, "cost.horizon", "2001"), Expectation.BadField("cost.horizon"));
        yield return Register("model-size", JsonEdit.WithRaw(document, "cost.outputWeight", Ones(10_001)), Expectation.BadField("cost.outputWeight"));
        yield return Register("model-size", JsonEdit.WithRaw(document, "plant.a", "[" + string.Join(",", Enumerable.Repeat("[1,0]", 10_001)) + "]"), Expectation.BadField("plant.a"));
        yield return Register("model-size", JsonEdit.WithRaw(document, "plant.a", "[" + string.Join(",", Enumerable.Repeat(Ones(10_001), 2)) + "]"), Expectation.BadField("plant.a"));
        yield return Register("model-size", JsonEdit.WithRaw(document, "name", JsonEdit.Quote(new string('n', 1_100_000))), Expectation.Refused(413));
        yield return Register("model-size", JsonEdit.WithRaw(document, "plant.a", new string('[', 100_000) + new string(']', 100_000)), Expectation.BadRequest);
        yield return Register("model-size", JsonEdit.WithRaw(document, "labels", "{\"states\":" + new string('[', 20) + new string(']', 20) + "}"), Expectation.BadRequest);
    }
}
