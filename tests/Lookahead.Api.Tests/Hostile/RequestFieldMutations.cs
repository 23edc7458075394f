using System.Text.Json;
using System.Text.Json.Nodes;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>
/// One field of a valid plan, simulation, estimate or step request changed: every number in turn set to a
/// malformed, overflowing, wrong-kind, huge or tiny value, members added, repeated, dropped or of the wrong kind,
/// vectors of the wrong length, schedules too long, and the closed sets (modes, feedback, timestamps) given
/// values outside them. A station's step stores what it accepts, so only certain refusals are sent to it.
/// </summary>
public static class RequestFieldMutations
{
    private static readonly HashSet<string> IntegerFields = ["steps", "seed", "fromStep", "sequence"];

    public static IEnumerable<HostileRequest> Generate(HostileTargets targets)
    {
        foreach (var target in BodyTarget.All(targets))
        {
            foreach (var request in Numbers(target).Concat(Members(target)).Concat(Vectors(target)).Concat(ClosedSets(target)))
            {
                yield return request;
            }
        }
    }

    private static HostileRequest Send(BodyTarget target, string family, string body, Expectation expect) =>
        HostileRequest.Json($"{target.Kind}-{family}", target.Method, target.Path, body, expect);

    private static IEnumerable<HostileRequest> Numbers(BodyTarget target)
    {
        foreach (var path in JsonEdit.NumberPaths(target.Body))
        {
            string field = JsonEdit.Field(path);
            bool integer = IntegerFields.Contains(LastName(path));
            foreach (var value in HostileValues.Malformed)
            {
                yield return Send(target, "number-malformed", JsonEdit.WithRaw(target.Body, path, value), Expectation.BadRequest);
            }

            foreach (var value in HostileValues.Overflowing)
            {
                yield return Send(target, "number-overflow", JsonEdit.WithRaw(target.Body, path, value), Expectation.BadField(field));
            }

            // [1] for the only entry of a vector may be a valid schedule of one row.
            foreach (var value in HostileValues.WrongKinds.Append(path.EndsWith(']') ? "null" : "\"\"").Where(v => !(v == "[1]" && IsSoleEntry(target.Body, path))))
            {
                yield return Send(target, "number-wrong-kind", JsonEdit.WithRaw(target.Body, path, value), Expectation.BadField(field));
            }

            // Huge and tiny numbers are valid JSON numbers: an integer field refuses them, a vector may plan with them.
            foreach (var value in HostileValues.Huge.Concat(HostileValues.Tiny))
            {
                bool tiny = HostileValues.Tiny.Contains(value);
                if (integer)
                {
                    yield return Send(target, tiny ? "number-tiny" : "number-huge", JsonEdit.WithRaw(target.Body, path, value), Expectation.BadField(field));
                }
                else if (target.Stateless)
                {
                    yield return Send(target, tiny ? "number-tiny" : "number-huge", JsonEdit.WithRaw(target.Body, path, value), Expectation.FieldOrAnswer(OverflowBlamed(target, field) ? field : null));
                }
                else if (!tiny)
                {
                    // A station keeps what it accepts: a reading of 1e308 must not become its estimate, planned or only tracked.
                    yield return Send(target, "number-huge", JsonEdit.WithRaw(target.Body, path, value), Expectation.BadField(field));
                    if (target.Body["mode"] is not null && field != "reference")
                    {
                        yield return Send(target, "number-huge", JsonEdit.WithRaw(JsonEdit.With(target.Body, "mode", "track"), path, value), Expectation.BadField(field));
                    }
                }
            }
        }
    }

    private static IEnumerable<HostileRequest> Members(BodyTarget target)
    {
        foreach (var objectPath in JsonEdit.ObjectPaths(target.Body))
        {
            var obj = (JsonObject)(objectPath.Length == 0 ? target.Body : JsonEdit.At(target.Body, objectPath)!);
            string Member(string name) => objectPath.Length == 0 ? name : $"{objectPath}.{name}";

            foreach (var name in new[] { "unknown", "State", "state ", "__proto__" }.Where(n => !obj.ContainsKey(n)))
            {
                yield return Send(target, "unknown-member", JsonEdit.WithExtraMember(target.Body, objectPath, name, "[1]"), Expectation.BadField(Member(name)));
            }

            foreach (var name in new[] { "\u0000", "\ud800", "st\udc00ate", "" })
            {
                yield return Send(target, "unknown-member", JsonEdit.WithExtraMember(target.Body, objectPath, name, "1"), Expectation.BadRequest);
            }
            foreach (var (name, value) in obj.ToList())
            {
                yield return Send(target, "duplicate-member", JsonEdit.WithExtraMember(target.Body, objectPath, name, value?.ToJsonString() ?? "null"), Expectation.BadField(Member(name)));
                if (value is null || value.GetValueKind() == JsonValueKind.Number)
                {
                    continue;
                }

                foreach (var other in HostileValues.OtherKinds(value.GetValueKind()))
                {
                    yield return Send(target, "wrong-kind", JsonEdit.WithRaw(target.Body, Member(name), other), Expectation.BadField(Member(name)));
                }
            }
        }

        foreach (var (name, named) in target.Required)
        {
            yield return Send(target, "missing-member", JsonEdit.Without(target.Body, name).ToJsonString(), Expectation.BadField(named));
            yield return Send(target, "missing-member", JsonEdit.WithRaw(target.Body, name, "null"), Expectation.BadField(name));
        }
    }

    /// <summary>Numeric vectors one entry short, one too long and empty; schedules longer than any horizon.</summary>
    private static IEnumerable<HostileRequest> Vectors(BodyTarget target)
    {
        var vectors = JsonEdit.NumberPaths(target.Body)
            .Where(p => p.EndsWith(']'))
            .Select(p => p[..p.LastIndexOf('[')])
            .Distinct()
            .Where(p => JsonEdit.At(target.Body, p) is JsonArray)
            .ToList();
        foreach (var path in vectors)
        {
            var vector = JsonEdit.At(target.Body, path)!.AsArray();
            var longer = vector.DeepClone().AsArray();
            longer.Add(1.0);
            var shapes = new List<string> { "[]", longer.ToJsonString() };
            if (vector.Count > 1)
            {
                shapes.Add(JsonEdit.Without(vector, $"[{vector.Count - 1}]").ToJsonString());
            }

            foreach (var shape in shapes)
            {
                yield return Send(target, "vector-length", JsonEdit.WithRaw(target.Body, path, shape), Expectation.BadField(JsonEdit.Field(path)));
            }
        }

        // More rows than the longest horizon (500) or simulation (10,000 steps) allows.
        foreach (var name in new[] { "reference", "disturbance", "references", "disturbances" })
        {
            if (target.Body[name] is not JsonArray array || array.Count == 0)
            {
                continue;
            }

            var row = array[0] is JsonArray ? array[0]!.ToJsonString() : name.EndsWith('s') ? array[0]!.ToJsonString() : array.ToJsonString();
            int rows = name.EndsWith('s') ? 10_001 : 501;
            yield return Send(target, "schedule-length", JsonEdit.WithRaw(target.Body, name, "[" + string.Join(",", Enumerable.Repeat(row, rows)) + "]"), Expectation.BadField(name));
        }
    }

    /// <summary>Values outside a closed set, and integers out of range.</summary>
    private static IEnumerable<HostileRequest> ClosedSets(BodyTarget target)
    {
        var sets = new Dictionary<string, (string[] Values, int Status)[]>
        {
            ["steps"] = [(["0", "-1", "10001", "2147483648", "1.5", "1e-400", "\"5\"", "true"], 400)],
            ["feedback"] = [(["\"Estimate\"", "\"\"", "\"state\\u0000\"", "\"model\""], 400)],
            ["mode"] = [(["\"Auto\"", "\"\"", "\"track\\u0000\"", "\"manual\""], 400)],
            ["timestamp"] = [(["\"not-a-date\"", "\"2026-13-01T00:00:00Z\"", "\"\\u0000\"", "\"2025-01-01T00:00:00Z\"", "\"0001-01-01T00:00:00Z\"", "\"2026-01-01T00:00:00Z\"", "\"9999-99-99\"", "1767225660"], 400)],
            ["sequence"] = [(["\"1\"", "1.5", "9223372036854775808", "1e400", "true"], 400), (["0", "2", "-1", "9223372036854775807"], 409)],
        };
        foreach (var (name, groups) in sets)
        {
            if (target.Body[name] is null)
            {
                continue;
            }

            foreach (var (values, status) in groups)
            {
                foreach (var value in values)
                {
                    yield return Send(target, "closed-set", JsonEdit.WithRaw(target.Body, name, value), new Expectation([status], name));
                }
            }
        }

        if (target.Body["truePlant"] is JsonObject)
        {
            foreach (var value in new[] { "\"Continuous\"", "\"\"", "\"discrete\\u0001\"" })
            {
                yield return Send(target, "closed-set", JsonEdit.WithRaw(target.Body, "truePlant.timeDomain", value), Expectation.BadField("truePlant"));
            }
        }
    }

    /// <summary>The only entry of its vector: [1] there is a schedule or forecast of one row.</summary>
    public static bool IsSoleEntry(JsonNode body, string path) =>
        path.EndsWith(']') && JsonEdit.At(body, path[..path.LastIndexOf('[')]) is JsonArray { Count: 1 };

    /// <summary>
    /// Whether an overflow caused by this field is refused naming it. A plan blames the state, setpoint or previous
    /// input whose share of the prediction overflows; a schedule, a forecast or an estimate's disturbance is not yet
    /// part of that blame (it names "plant"), and a simulation reports the overflow of a plan inside its loop under
    /// the plan's field names. Those refusals must still be 400 problems naming a field, just not necessarily this one.
    /// </summary>
    private static bool OverflowBlamed(BodyTarget target, string field) =>
        target.Kind is "plan" or "alias-plan"
        && (field is "state" or "previousInput" || (field == "reference" && target.Body["reference"] is JsonArray { Count: > 0 } reference && reference[0] is not JsonArray));

    /// <summary>The member name a number sits under ("fromStep" for "references[1].fromStep"); empty for an array entry.</summary>
    private static string LastName(string path) => path.EndsWith(']') ? "" : path[(path.LastIndexOf('.') + 1)..];
}
