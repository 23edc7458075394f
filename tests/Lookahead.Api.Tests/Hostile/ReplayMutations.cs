using System.Text;
using System.Text.Json.Nodes;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>
/// Replay uploads with garbage in them. Damage to the whole upload (not JSON's envelope, a CSV header that does not
/// fit the model, the wrong content type) is refused with a problem before any row is planned. Damage to a row is
/// reported in the 200 stream as that row's error (<see cref="Expectation.ReplayRow"/>), since replay answers as it reads.
/// </summary>
public static class ReplayMutations
{
    private const string Json = "application/json";
    private const string Ndjson = "application/x-ndjson";
    private const string Csv = "text/csv";

    private static readonly string[] GarbageLines =
    [
        "{not json", "NaN", "[]", "null", "\"x\"", "1", "{}", "{\"state\":", "\u0001\u0002", "{\"state\":[1e400,0]}", "{\"state\":[NaN,0]}", "{\"state\":\"0,0\"}",
    ];

    private static readonly string[] GarbageCells =
    [
        "abc", "NaN", "Infinity", "-Infinity", "1e400", "-1e400", "0x10", "1e", "--1", "\u0001", "1\u00002", "\"1\"\"\"", "1,5", "∞", "1 2", "+-1", "١", "", "\"\"",
    ];

    public static IEnumerable<HostileRequest> Generate(HostileTargets targets, Random random)
    {
        foreach (var model in targets.Models)
        {
            string path = $"/v1/models/{model.Id}/plans";
            foreach (var request in JsonReplays(model, path, random).Concat(NdjsonReplays(model, path, random)).Concat(CsvReplays(model, path)))
            {
                yield return request;
            }

            foreach (var type in new[] { "text/plain", "application/xml", "text/tab-separated-values", "application/json-seq", "multipart/form-data; boundary=x" })
            {
                yield return new HostileRequest("replay-content-type", HttpMethod.Post, path, type, Encoding.UTF8.GetBytes(model.ReplayNdjson()), Expectation.UnsupportedMediaType);
            }

            yield return new HostileRequest("replay-content-type", HttpMethod.Post, path, null, Encoding.UTF8.GetBytes(model.ReplayNdjson()), Expectation.UnsupportedMediaType);
        }

        var plain = targets.Models.First(m => !m.HasEstimator);
        yield return Upload("replay-json-envelope", $"/v1/models/{plain.Id}/plans", Json, """{"requests":[{"measurement":[1,2],"appliedInput":[0]}]}""", Expectation.BadField("requests[0].measurement"));
        var zones = targets.Zones;
        yield return Upload("replay-json-envelope", $"/v1/models/{zones.Id}/plans", Json, """{"requests":[{"state":[1,2],"measurement":[1,2],"appliedInput":[60,60]}]}""", Expectation.BadField("requests[0].measurement"));
        yield return Upload("replay-ndjson-line", $"/v1/models/{zones.Id}/plans", Ndjson, "{\"estimate\":{\"state\":[1,2],\"disturbance\":[0,0]},\"measurement\":[1,2]}\n", Expectation.BadField("measurement"));
    }

    private static HostileRequest Upload(string family, string path, string type, string body, Expectation expect) =>
        new(family, HttpMethod.Post, path, type, Encoding.UTF8.GetBytes(body), expect);

    private static IEnumerable<HostileRequest> JsonReplays(HostileTargets.TargetModel model, string path, Random random)
    {
        string rows = string.Join(",", model.ReplayRows.Select(r => r.ToJsonString()));
        string valid = model.ReplayJson();

        // The envelope, before any row: refused as a whole.
        foreach (var body in new[]
        {
            "", " ", "[]", "null", "\"requests\"", "{}", "{\"requests\":{}}", "{\"requests\":1}", "{\"requests\":null}", $"{{\"detail\":\"everything\",\"requests\":[{rows}]}}",
            $"{{\"detail\":1,\"requests\":[{rows}]}}", $"{{\"detail\":\"full\\u0000\",\"requests\":[{rows}]}}", $"{{\"unknown\":1,\"requests\":[{rows}]}}", $"{{\"Requests\":[{rows}]}}",
            "{\"requests\"", "{\"requests\":", "{\"detail\":\"full\"", new string('{', 10_000),
        })
        {
            yield return Upload("replay-json-envelope", path, Json, body, Expectation.BadRequest);
        }

        // After the rows have started: the stream reports the broken row.
        foreach (var body in new[] { valid + "x", valid[..^1] + ",\"unknown\":1}", valid[..^2], valid[..^3], valid[..(valid.Length / 2)], valid + "{}" })
        {
            yield return Upload("replay-json-row", path, Json, body, Expectation.BadRow);
        }

        foreach (int row in new[] { 0, 2 })
        {
            var requests = model.ReplayRows;
            string With(string replacement) =>
                "{\"detail\":\"first-move\",\"requests\":[" + string.Join(",", requests.Select((r, i) => i == row ? replacement : r.ToJsonString())) + "]}";

            foreach (var line in RowDamage(requests[row], random))
            {
                yield return Upload("replay-json-row", path, Json, With(line), Expectation.BadRow);
            }

            yield return Upload("replay-json-row", path, Json, With("{\"state\":[" + new string(' ', 70_000) + "]}"), Expectation.BadRow);
            yield return Upload("replay-json-row", path, Json, With(new string('[', 5_000) + new string(']', 5_000)), Expectation.BadRow);
        }
    }

    /// <summary>A row changed so that it cannot plan: broken, of the wrong kind, a number that is not one, a vector of the wrong length, an unknown or repeated member.</summary>
    private static IEnumerable<string> RowDamage(JsonNode row, Random random)
    {
        foreach (var garbage in new[] { "1", "\"x\"", "null", "[]", "{}", "{\"unknown\":1}" })
        {
            yield return garbage;
        }

        foreach (var value in HostileValues.AlwaysRefused)
        {
            var numbers = JsonEdit.NumberPaths(row).Where(p => !(value == "[1]" && RequestFieldMutations.IsSoleEntry(row, p))).ToList();
            yield return JsonEdit.WithRaw(row, numbers[random.Next(numbers.Count)], value);
        }

        string first = ((JsonObject)row).First().Key;
        yield return JsonEdit.WithExtraMember(row, "", first, row[first]!.ToJsonString());
        yield return JsonEdit.WithExtraMember(row, "", "unknown", "1");
        var vector = JsonEdit.At(row, first) is JsonArray ? first : $"{first}.state";
        var longer = JsonEdit.At(row, vector)!.DeepClone().AsArray();
        longer.Add(1.0);
        yield return JsonEdit.WithRaw(row, vector, longer.ToJsonString());
        yield return JsonEdit.WithRaw(row, vector, "[]");
    }

    private static IEnumerable<HostileRequest> NdjsonReplays(HostileTargets.TargetModel model, string path, Random random)
    {
        var rows = model.ReplayRows.Select(r => r.ToJsonString()).ToList();
        foreach (int row in new[] { 0, 2 })
        {
            byte[] With(byte[] line) =>
            [
                .. Encoding.UTF8.GetBytes(string.Join("\n", rows.Take(row)) + (row > 0 ? "\n" : "")),
                .. line,
                .. Encoding.UTF8.GetBytes("\n" + string.Join("\n", rows.Skip(row + 1)) + "\n"),
            ];

            foreach (var line in GarbageLines.Concat(RowDamage(model.ReplayRows[row], random)))
            {
                yield return new HostileRequest("replay-ndjson-line", HttpMethod.Post, path, Ndjson, With(Encoding.UTF8.GetBytes(line)), Expectation.BadRow);
            }

            foreach (var bytes in new byte[][] { [0x00], [0xff, 0xfe], [0x7b, 0x22, 0xc3, 0x28, 0x22, 0x3a, 0x31, 0x7d], [.. Encoding.UTF8.GetBytes(rows[row]), 0x00] })
            {
                yield return new HostileRequest("replay-ndjson-line", HttpMethod.Post, path, Ndjson, With(bytes), Expectation.BadRow);
            }

            yield return new HostileRequest("replay-ndjson-line", HttpMethod.Post, path, Ndjson, With(Encoding.UTF8.GetBytes("{\"state\":[" + new string(' ', 70_000) + "]}")), Expectation.BadRow);
            yield return new HostileRequest("replay-ndjson-line", HttpMethod.Post, path, Ndjson, With(Encoding.UTF8.GetBytes(new string('[', 10_000))), Expectation.BadRow);
        }

        // An NDJSON upload of no lines is a replay of no rows, answered with no lines.
        foreach (var body in new[] { "", "\n", "\n\n\r\n" })
        {
            yield return Upload("replay-ndjson-body", path, Ndjson, body, new Expectation([400], MayAnswer: true));
        }

        yield return Upload("replay-ndjson-body", path, Ndjson, "\u0000", Expectation.BadRow);
    }

    private static IEnumerable<HostileRequest> CsvReplays(HostileTargets.TargetModel model, string path)
    {
        if (model.Csv is null)
        {
            yield break;
        }

        var lines = model.Csv.TrimEnd('\n').Split('\n');
        var header = lines[0].Split(',');
        string Join(IEnumerable<string> cells) => string.Join(",", cells);
        string rest = string.Join("\n", lines.Skip(1)) + "\n";

        // The header decides the columns: one that does not fit the model refuses the upload.
        foreach (var bad in new[]
        {
            "", "\n", "foo,bar\n1,2\n", Join(header.Skip(1)) + "\n" + rest, Join(header.Prepend(header[0])) + "\n" + rest, "\"" + lines[0] + "\n" + rest,
            Join(header.Select((h, i) => i == 0 ? h + "\u0000" : h)) + "\n" + rest, Join(header.Select((h, i) => i == 0 ? h.ToUpperInvariant() : h)) + "\n" + rest,
            Join(header.Select((h, i) => i == 0 ? "\u001b" + h : h)) + "\n" + rest, new string('x', 70_000) + "\n" + rest,
        })
        {
            yield return Upload("replay-csv-header", path, Csv, bad, Expectation.BadRequest);
        }

        // Garbage in a cell of a required column (a state, or a measurement of a group of two or more, or an applied input).
        int required = header.TakeWhile(h => !h.StartsWith('r') && !h.StartsWith("prev", StringComparison.Ordinal) && !h.StartsWith('v')).Count();
        foreach (int row in new[] { 1, lines.Length - 1 })
        {
            for (int column = 0; column < required; column++)
            {
                foreach (var cell in GarbageCells)
                {
                    var cells = lines[row].Split(',');
                    cells[column] = cell;
                    yield return Upload("replay-csv-cell", path, Csv, string.Join("\n", lines.Select((l, i) => i == row ? Join(cells) : l)) + "\n", Expectation.BadRow);
                }
            }

            foreach (var line in new[] { lines[row] + ",1", Join(lines[row].Split(',').SkipLast(1)), "\"" + lines[row], new string('1', 70_000), "\u0000", lines[row] + "\u0000" })
            {
                yield return Upload("replay-csv-row", path, Csv, string.Join("\n", lines.Select((l, i) => i == row ? line : l)) + "\n", Expectation.BadRow);
            }
        }
    }
}
