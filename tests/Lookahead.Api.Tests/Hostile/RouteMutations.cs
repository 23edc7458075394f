using System.Text;
using System.Text.Json.Nodes;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>
/// Hostile routes: ids and names that are too long, carry NUL or other control characters (percent-encoded, as a
/// client must send them), bytes that are not UTF-8, the wrong case or length; query values of the wrong kind or out
/// of range; methods a route does not have; routes that do not exist. Bodies are valid, so the route is what is refused.
/// </summary>
public static class RouteMutations
{
    public static IEnumerable<HostileRequest> Generate(HostileTargets targets)
    {
        return Ids(targets).Concat(Names(targets)).Concat(Queries(targets)).Concat(Methods(targets)).Concat(UnknownRoutes(targets));
    }

    private static HostileRequest Send(string family, HttpMethod method, string path, JsonNode? body, Expectation expect) =>
        body is null
            ? new HostileRequest(family, method, path, null, null, expect)
            : HostileRequest.Json(family, method, path, body.ToJsonString(), expect);

    private static IEnumerable<HostileRequest> Ids(HostileTargets targets)
    {
        string id = targets.ZonesId;
        var malformed = new[]
        {
            new string('a', 10_000), new string('0', 10_000), new string('f', 64) + new string('0', 9_936), id[..63], id + "0", id.ToUpperInvariant(),
            id[..32] + "%00" + id[33..], "%00" + id[1..], id[..63] + "%00", string.Concat(Enumerable.Repeat("%00", 64)), id[..32] + "%01" + id[33..],
            id[..32] + "%1b" + id[33..], id[..32] + "%7f" + id[33..], id[..32] + "%c2%85" + id[34..], id[..63] + "%ff", string.Concat(Enumerable.Repeat("%20", 64)),
            id[..63] + "g", "%e2%80%8b" + id[1..], "null", "-1", "%f0%9f%98%80", id + "%0a",
        };
        var routes = new (HttpMethod Method, string Suffix, JsonNode? Body, string? ContentType)[]
        {
            (HttpMethod.Get, "", null, null), (HttpMethod.Delete, "", null, null), (HttpMethod.Get, "/gain", null, null),
            (HttpMethod.Post, "/plan", targets.Zones.Plan, null), (HttpMethod.Post, "/simulate", targets.Zones.Simulate, null),
            (HttpMethod.Post, "/estimate", targets.Zones.Estimate, null), (HttpMethod.Post, "/plans", null, "application/x-ndjson"),
        };
        foreach (var (method, suffix, body, contentType) in routes)
        {
            foreach (var value in malformed)
            {
                yield return Route("path-id", method, $"/v1/models/{value}{suffix}", body, contentType, targets, Expectation.BadField("id"));
            }

            yield return Route("path-id", method, $"/v1/models/{new string('0', 64)}{suffix}", body, contentType, targets, new Expectation([404], "id"));
            yield return Route("path-id", method, $"/v1/models/{id[..63]}%2f{suffix}", body, contentType, targets, Expectation.Refused(400, 404));
        }
    }

    private static HostileRequest Route(string family, HttpMethod method, string path, JsonNode? body, string? contentType, HostileTargets targets, Expectation expect)
    {
        if (contentType == "application/x-ndjson")
        {
            return new HostileRequest(family, method, path, contentType, Encoding.UTF8.GetBytes(targets.Zones.ReplayNdjson()), expect);
        }

        return Send(family, method, path, body, expect);
    }

    private static IEnumerable<HostileRequest> Names(HostileTargets targets)
    {
        var malformed = new[]
        {
            new string('a', 10_000), new string('a', 65), "Hostile-zones", "-x", "_x", "a%20b", "a%00b", "%00", HostileTargets.Alias + "%00", "%00" + HostileTargets.Station,
            "a%01b", "a%1bb", "a%7fb", "a%c2%85b", "%c3%a9", "a%ffb", "%f0%9f%98%80", "a%0ab", "a%09b", HostileTargets.Station + "%0d%0a",
        };
        var routes = new (HttpMethod Method, string Template, JsonNode? Body, bool Creates)[]
        {
            (HttpMethod.Put, "/v1/aliases/{0}", BindingMutations.AliasBody(targets), true), (HttpMethod.Get, "/v1/aliases/{0}", null, false),
            (HttpMethod.Delete, "/v1/aliases/{0}", null, false), (HttpMethod.Post, "/v1/aliases/{0}/plan", targets.Zones.Plan, false),
            (HttpMethod.Put, "/v1/stations/{0}", BindingMutations.StationBody(), true), (HttpMethod.Get, "/v1/stations/{0}", null, false),
            (HttpMethod.Delete, "/v1/stations/{0}", null, false), (HttpMethod.Get, "/v1/stations/{0}/steps", null, false),
            (HttpMethod.Post, "/v1/stations/{0}/step", HostileTargets.StepBody(1, "2026-01-01T00:01:00Z"), false),
        };
        foreach (var (method, template, body, creates) in routes)
        {
            foreach (var name in malformed)
            {
                yield return Send("path-name", method, template.Replace("{0}", name, StringComparison.Ordinal), body, Expectation.BadField("name"));
            }

            yield return Send("path-name", method, template.Replace("{0}", "a%2fb", StringComparison.Ordinal), body, Expectation.Refused(400, 404));
            if (!creates)
            {
                yield return Send("path-name", method, template.Replace("{0}", "no-such-name", StringComparison.Ordinal), body, new Expectation([404], "name"));
            }
        }
    }

    private static IEnumerable<HostileRequest> Queries(HostileTargets targets)
    {
        var integers = new[] { "abc", "-1", "1e3", "1.5", "99999999999", "%00", "%01", "1%00", new string('9', 10_000), "0x10", "%20", "1&{0}=2", "%ef%bc%91" };
        var lists = new[] { "/v1/models", "/v1/stations", $"/v1/stations/{HostileTargets.Station}/steps" };
        foreach (var list in lists)
        {
            foreach (var name in new[] { "limit", "offset" })
            {
                if (name == "offset" && list.EndsWith("/steps", StringComparison.Ordinal))
                {
                    continue;
                }

                foreach (var value in integers.Concat(name == "limit" ? ["0", "1001"] : []))
                {
                    // The framework binds integers with .NET's parser, which reads trailing NULs as the end of the
                    // number: "1%00" is 1. These are reads, so that answer is allowed (and reported).
                    var expect = value == "1%00" ? Expectation.FieldOrAnswer(name) : Expectation.BadField(name);
                    yield return Send("query", HttpMethod.Get, $"{list}?{name}={value.Replace("{0}", name, StringComparison.Ordinal)}", null, expect);
                }
            }
        }

        var formats = new[] { "pdf", "SVG", "%00", "svg%00", "svg%20", "json,svg", new string('s', 10_000), "csv%00", "xlsx" };
        var planned = new (string Path, JsonNode Body)[]
        {
            ($"/v1/models/{targets.ZonesId}/plan", targets.Zones.Plan), ($"/v1/models/{targets.ZonesId}/simulate", targets.Zones.Simulate!),
            ($"/v1/aliases/{HostileTargets.Alias}/plan", targets.Zones.Plan),
        };
        foreach (var (path, body) in planned)
        {
            foreach (var format in formats)
            {
                yield return Send("query", HttpMethod.Post, $"{path}?format={format}", body, Expectation.BadField("format"));
            }
        }

        foreach (var format in new[] { "pdf", "CSV", "%00", "xml" })
        {
            yield return Send("query", HttpMethod.Get, $"/v1/stations/{HostileTargets.Station}/steps?format={format}", null, Expectation.BadField("format"));
        }

        foreach (var detail in new[] { "everything", "FULL", "%00", "first-move%00", "" })
        {
            yield return new HostileRequest("query", HttpMethod.Post, $"/v1/models/{targets.ZonesId}/plans?detail={detail}", "application/x-ndjson", Encoding.UTF8.GetBytes(targets.Zones.ReplayNdjson()), Expectation.BadField("detail"));
        }
    }

    private static IEnumerable<HostileRequest> Methods(HostileTargets targets)
    {
        string id = targets.ZonesId;
        var wrong = new (string Method, string Path)[]
        {
            ("PUT", "/v1/models"), ("DELETE", "/v1/models"), ("PATCH", "/v1/models"), ("POST", $"/v1/models/{id}"), ("PUT", $"/v1/models/{id}"),
            ("PATCH", $"/v1/models/{id}"), ("GET", $"/v1/models/{id}/plan"), ("PUT", $"/v1/models/{id}/plan"), ("GET", $"/v1/models/{id}/plans"),
            ("GET", $"/v1/models/{id}/simulate"), ("DELETE", $"/v1/models/{id}/estimate"), ("POST", $"/v1/models/{id}/gain"),
            ("POST", $"/v1/aliases/{HostileTargets.Alias}"), ("PATCH", $"/v1/aliases/{HostileTargets.Alias}"), ("GET", $"/v1/aliases/{HostileTargets.Alias}/plan"),
            ("POST", "/v1/stations"), ("DELETE", "/v1/stations"), ("POST", $"/v1/stations/{HostileTargets.Station}"), ("PATCH", $"/v1/stations/{HostileTargets.Station}"),
            ("GET", $"/v1/stations/{HostileTargets.Station}/step"), ("PUT", $"/v1/stations/{HostileTargets.Station}/step"), ("POST", $"/v1/stations/{HostileTargets.Station}/steps"),
            ("DELETE", $"/v1/stations/{HostileTargets.Station}/steps"), ("POST", "/health/live"), ("PUT", "/health/ready"), ("DELETE", "/health/live"),
            ("POST", "/metrics"), ("DELETE", "/metrics"), ("BREW", "/v1/models"), ("TRACE", "/v1/models"),
        };
        foreach (var (method, path) in wrong)
        {
            yield return new HostileRequest("method", new HttpMethod(method), path, "application/json", "{}"u8.ToArray(), Expectation.MethodNotAllowed);
            yield return new HostileRequest("method", new HttpMethod(method), path, null, null, Expectation.MethodNotAllowed);
        }
    }

    private static IEnumerable<HostileRequest> UnknownRoutes(HostileTargets targets)
    {
        string id = targets.ZonesId;
        var unknown = new[]
        {
            "/v1/model", "/v2/models", "/v1/models/" + id + "/planz", "/v1/models/" + id + "/plan/extra", "/v1", "/v1/", "/v1/%00", "/%00",
            "/v1/models/" + id + "/gain/%00", "/v1/stations/" + HostileTargets.Station + "/stepz", "/health", "/health/live/x", "/health/live%00",
            "/metrics/x", "/metrics%00", "/v1/aliasez", "/v1/aliases/" + HostileTargets.Alias + "/plan/x", "/" + new string('x', 10_000),
            "/v1/models/" + id + "/" + new string('p', 10_000), "/v1/models%2f" + id,
        };
        foreach (var path in unknown)
        {
            foreach (var method in new[] { HttpMethod.Get, HttpMethod.Post })
            {
                yield return new HostileRequest("unknown-route", method, path, "application/json", "{}"u8.ToArray(), Expectation.Refused(404, 405));
            }
        }
    }
}
