using System.Text.Json.Nodes;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>
/// Bodies that point an alias or bind a station, sent to the existing alias and station (a wrong acceptance would
/// re-point or reset them) and to new names (a wrong acceptance would create them); and the delete of a model an
/// alias still points at.
/// </summary>
public static class BindingMutations
{
    public static IEnumerable<HostileRequest> Generate(HostileTargets targets)
    {
        string id = targets.ZonesId;
        string withoutEstimator = targets.Models.First(m => !m.HasEstimator).Id;
        var modelIds = new (string Raw, int Status)[]
        {
            (JsonEdit.Quote(id.ToUpperInvariant()), 400), (JsonEdit.Quote(id[..63]), 400), (JsonEdit.Quote(id + "0"), 400),
            (JsonEdit.Quote(id[..30] + "\u0000" + id[31..]), 400), (JsonEdit.Quote(id + "\u0001"), 400), (JsonEdit.Quote(""), 400),
            (JsonEdit.Quote(new string('a', 10_000)), 400), (JsonEdit.Quote(" " + id[1..]), 400), ("1", 400), ("[]", 400), ("{}", 400),
            ("true", 400), ("null", 400), (JsonEdit.Quote(new string('0', 64)), 404), (JsonEdit.Quote("\ud800" + id[1..]), 400),
        };
        foreach (var alias in new[] { HostileTargets.Alias, "hostile-new" })
        {
            foreach (var (raw, status) in modelIds)
            {
                yield return HostileRequest.Json("alias-body", HttpMethod.Put, $"/v1/aliases/{alias}", $"{{\"modelId\":{raw}}}", new Expectation([status], "modelId"));
            }

            yield return HostileRequest.Json("alias-body", HttpMethod.Put, $"/v1/aliases/{alias}", "{}", Expectation.BadField("modelId"));
            yield return HostileRequest.Json("alias-body", HttpMethod.Put, $"/v1/aliases/{alias}", $"{{\"modelId\":\"{id}\",\"unknown\":1}}", Expectation.BadField("unknown"));
            yield return HostileRequest.Json("alias-body", HttpMethod.Put, $"/v1/aliases/{alias}", $"{{\"modelId\":\"{id}\",\"modelId\":\"{id}\"}}", Expectation.BadField("modelId"));
            yield return HostileRequest.Json("alias-body", HttpMethod.Put, $"/v1/aliases/{alias}", $"{{\"ModelId\":\"{id}\"}}", Expectation.BadField("ModelId"));
        }

        var models = new (string Raw, string Path)[]
        {
            (JsonEdit.Quote(""), "model"), (JsonEdit.Quote("HOSTILE-ZONES"), "model"), (JsonEdit.Quote("hostile\u0001zones"), "model"),
            (JsonEdit.Quote(HostileTargets.Alias + "\u0000"), "model"), (JsonEdit.Quote(new string('a', 10_000)), "model"),
            (JsonEdit.Quote(withoutEstimator), "model"), (JsonEdit.Quote("no-such-alias"), "model"), (JsonEdit.Quote(new string('0', 64)), "model"),
            ("1", "model"), ("null", "model"), ("[]", "model"), ("true", "model"), (JsonEdit.Quote("\udc00"), "model"),
        };
        foreach (var station in new[] { HostileTargets.Station, "hostile-new" })
        {
            foreach (var (raw, path) in models)
            {
                yield return HostileRequest.Json("station-body", HttpMethod.Put, $"/v1/stations/{station}", $"{{\"model\":{raw},\"detail\":\"full\"}}", new Expectation([400], path));
            }

            foreach (var detail in new[] { "\"everything\"", "\"FULL\"", "\"first-move\\u0000\"", "\"\"", "1", "[]" })
            {
                yield return HostileRequest.Json("station-body", HttpMethod.Put, $"/v1/stations/{station}", $"{{\"model\":\"{HostileTargets.Alias}\",\"detail\":{detail}}}", Expectation.BadField("detail"));
            }

            yield return HostileRequest.Json("station-body", HttpMethod.Put, $"/v1/stations/{station}", "{}", Expectation.BadField("model"));
            yield return HostileRequest.Json("station-body", HttpMethod.Put, $"/v1/stations/{station}", $"{{\"model\":\"{HostileTargets.Alias}\",\"sequence\":0}}", Expectation.BadField("sequence"));
            yield return HostileRequest.Json("station-body", HttpMethod.Put, $"/v1/stations/{station}", $"{{\"model\":\"{HostileTargets.Alias}\",\"model\":\"{HostileTargets.Alias}\"}}", Expectation.BadField("model"));
        }

        // The alias still points at this model.
        yield return new HostileRequest("model-delete-in-use", HttpMethod.Delete, $"/v1/models/{id}", null, null, new Expectation([409], "id"));
    }

    /// <summary>A valid binding body, for route mutations that only change the name.</summary>
    public static JsonObject AliasBody(HostileTargets targets) => new() { ["modelId"] = targets.ZonesId };

    public static JsonObject StationBody() => new() { ["model"] = HostileTargets.Alias, ["detail"] = "full" };
}
