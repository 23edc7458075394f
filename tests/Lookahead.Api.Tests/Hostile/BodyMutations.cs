using System.Text;
using System.Text.Json.Nodes;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>
/// Whole-body damage, the same for every endpoint that reads JSON: no body, not an object, cut short, garbage after
/// it, comments, single quotes, a NUL or a byte that is not UTF-8 spliced in, nesting thousands deep, a body past the
/// size limit, and a valid body under a content type that is not JSON.
/// </summary>
public static class BodyMutations
{
    private static readonly string[] WrongContentTypes =
    [
        "text/plain", "application/xml", "application/x-www-form-urlencoded", "multipart/form-data; boundary=x", "application/jsonx", "json", "text/json", "*/*",
    ];

    public static IEnumerable<HostileRequest> Generate(HostileTargets targets, Random random)
    {
        var endpoints = BodyTarget.All(targets)
            .Append(new BodyTarget("register", HttpMethod.Post, "/v1/models", targets.Models[1].Document, false, []))
            .Append(new BodyTarget("alias-put", HttpMethod.Put, $"/v1/aliases/{HostileTargets.Alias}", BindingMutations.AliasBody(targets), false, []))
            .Append(new BodyTarget("alias-put", HttpMethod.Put, "/v1/aliases/hostile-new", BindingMutations.AliasBody(targets), false, []))
            .Append(new BodyTarget("station-put", HttpMethod.Put, $"/v1/stations/{HostileTargets.Station}", BindingMutations.StationBody(), false, []))
            .Append(new BodyTarget("station-put", HttpMethod.Put, "/v1/stations/hostile-new", BindingMutations.StationBody(), false, []));
        foreach (var target in endpoints)
        {
            foreach (var request in Damaged(target, random))
            {
                yield return request;
            }
        }
    }

    private static IEnumerable<HostileRequest> Damaged(BodyTarget target, Random random)
    {
        string family = $"body-{target.Kind}";
        string text = target.Body.ToJsonString();
        byte[] bytes = Encoding.UTF8.GetBytes(text);
        HostileRequest Raw(byte[] body, Expectation expect) => new(family, target.Method, target.Path, "application/json", body, expect);
        HostileRequest Text(string body, Expectation expect) => Raw(Encoding.UTF8.GetBytes(body), expect);

        yield return Raw([], Expectation.BadRequest);
        foreach (var body in new[] { " ", "\r\n\t", "null", "[]", "[{}]", "\"x\"", "1", "true", "{", "}", "{}{}", "\u0000" })
        {
            yield return Text(body, Expectation.BadRequest);
        }

        // Any proper prefix of an object is not JSON.
        foreach (int cut in Enumerable.Range(0, 8).Select(_ => random.Next(1, text.Length - 1)).Append(text.Length - 1).Distinct())
        {
            yield return Raw(bytes[..cut], Expectation.BadRequest);
        }

        foreach (var tail in new[] { "x", "}", "{}", ",", " 1", "\u0000", "]" })
        {
            yield return Text(text + tail, Expectation.BadRequest);
        }

        yield return Text("/* c */" + text, Expectation.BadRequest);
        yield return Text(text[..^1] + ",}", Expectation.BadRequest);
        yield return Text(text.Replace('"', '\''), Expectation.BadRequest);
        yield return Text(text.Replace(':', '='), Expectation.BadRequest);

        // A NUL, a lone continuation byte and an unfinished sequence, spliced in at seeded places.
        foreach (var splice in new byte[][] { [0x00], [0x80], [0xff], [0xc3], [0xed, 0xa0, 0x80] })
        {
            int at = random.Next(1, bytes.Length - 1);
            yield return Raw([.. bytes[..at], .. splice, .. bytes[at..]], Expectation.BadRequest);
        }

        yield return Text(new string('[', 100_000) + new string(']', 100_000), Expectation.BadRequest);
        yield return Text(new string('{', 5_000), Expectation.BadRequest);
        string firstMember = ((JsonObject)target.Body).First().Key;
        yield return Text(JsonEdit.WithRaw(target.Body, firstMember, new string('[', 17) + "1" + new string(']', 17)), Expectation.BadRequest);
        yield return Text(JsonEdit.WithRaw(target.Body, firstMember, "{\"a\":" + new string('[', 3_000) + new string(']', 3_000) + "}"), Expectation.BadRequest);

        // Past the 1 MiB body limit: whitespace is still body.
        yield return Text(new string(' ', 1_100_000) + text, Expectation.Refused(413));
        yield return Text(JsonEdit.WithRaw(target.Body, firstMember, "[" + string.Join(",", Enumerable.Repeat("1", 300_000)) + "]"), Expectation.Refused(400, 413));

        foreach (var type in WrongContentTypes)
        {
            yield return new HostileRequest(family, target.Method, target.Path, type, bytes, Expectation.UnsupportedMediaType);
        }

        yield return new HostileRequest(family, target.Method, target.Path, null, bytes, Expectation.UnsupportedMediaType);
        yield return new HostileRequest(family, target.Method, target.Path, null, null, Expectation.UnsupportedMediaType);
    }
}
