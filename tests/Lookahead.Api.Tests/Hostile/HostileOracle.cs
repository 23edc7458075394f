using System.Text.Json;
using Lookahead.Api.Tests.Support;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>
/// Judges one answer to a hostile request against its <see cref="Expectation"/>. A refusal must be an RFC 9457
/// problem: application/problem+json whose status matches the response, a type and a title, an errors array, no
/// stack trace. A 400 must name at least one field with a reason (the service promises the path of every bad
/// field); 404, 405, 413 and 415 are problems that may carry no field.
/// </summary>
public static class HostileOracle
{
    /// <returns>Null when the answer is acceptable, else why not.</returns>
    public static string? Judge(HostileRequest request, int status, string? mediaType, string body)
    {
        var expect = request.Expect;
        if (status >= 500)
        {
            return $"answered {status}";
        }

        if (status is >= 200 and < 300)
        {
            if (expect.ReplayRow)
            {
                return ReportsFailedRow(mediaType, body) ? null : $"answered {status} without reporting the bad row as an error";
            }

            return expect.MayAnswer ? WellFormedAnswer(mediaType, body) : $"answered {status}: the request was accepted";
        }

        if (status is < 400 or >= 500)
        {
            return $"answered {status}";
        }

        if (expect.Statuses.Length > 0 && !expect.Statuses.Contains(status))
        {
            return $"answered {status}; expected {string.Join(" or ", expect.Statuses)}";
        }

        return Problem(status, mediaType, body, expect.Path);
    }

    private static string? Problem(int status, string? mediaType, string body, string? path)
    {
        if (mediaType != "application/problem+json")
        {
            return $"{status} with content type '{mediaType}', not a problem document";
        }

        JsonDocument document;
        try
        {
            document = JsonDocument.Parse(body);
        }
        catch (JsonException)
        {
            return $"{status} problem that is not JSON";
        }

        using (document)
        {
            var root = document.RootElement;
            if (root.ValueKind != JsonValueKind.Object)
            {
                return $"{status} problem that is not an object";
            }

            if (!root.TryGetProperty("status", out var given) || given.ValueKind != JsonValueKind.Number || given.GetInt32() != status)
            {
                return $"{status} problem whose status member is not {status}";
            }

            if (!NonEmptyString(root, "type") || !NonEmptyString(root, "title"))
            {
                return $"{status} problem without type or title";
            }

            if (body.Contains("   at ", StringComparison.Ordinal) || body.Contains("Exception", StringComparison.Ordinal))
            {
                return $"{status} problem that leaks an exception";
            }

            if (!root.TryGetProperty("errors", out var errors) || errors.ValueKind != JsonValueKind.Array)
            {
                return $"{status} problem without an errors array";
            }

            var named = new List<(string Path, string Reason)>();
            foreach (var error in errors.EnumerateArray())
            {
                if (error.ValueKind != JsonValueKind.Object
                    || !error.TryGetProperty("path", out var p) || p.ValueKind != JsonValueKind.String
                    || !error.TryGetProperty("reason", out var r) || r.ValueKind != JsonValueKind.String || r.GetString()!.Length == 0)
                {
                    return $"{status} problem with an error that is not {{path, reason}}";
                }

                named.Add((p.GetString()!, r.GetString()!));
            }

            if (status == 400 && named.Count == 0)
            {
                return "400 problem that names no field";
            }

            if (path is not null && !named.Any(e => Names(e.Path, path)))
            {
                return $"{status} problem that does not name '{path}' (named: {string.Join("; ", named.Select(e => $"{e.Path}: {e.Reason}"))})";
            }
        }

        return null;
    }

    /// <summary>The error names the field itself or a part of it ("plant.a" is named by "plant.a" and "plant.a[1][0]").</summary>
    public static bool Names(string errorPath, string field) =>
        errorPath == field
        || (errorPath.StartsWith(field, StringComparison.Ordinal) && errorPath.Length > field.Length && errorPath[field.Length] is '.' or '[');

    private static bool NonEmptyString(JsonElement root, string name) =>
        root.TryGetProperty(name, out var value) && value.ValueKind == JsonValueKind.String && value.GetString()!.Length > 0;

    /// <summary>A success is still a correct answer: JSON (or an SVG chart) that parses, with no non-finite number in it.</summary>
    private static string? WellFormedAnswer(string? mediaType, string body)
    {
        if (mediaType == "image/svg+xml")
        {
            return body.StartsWith("<svg", StringComparison.Ordinal) && !body.Contains("NaN", StringComparison.Ordinal) && !body.Contains("Infinity", StringComparison.Ordinal)
                ? null : "an SVG answer that is not a finite chart";
        }

        try
        {
            if (mediaType == "application/x-ndjson")
            {
                foreach (var line in body.Split('\n', StringSplitOptions.RemoveEmptyEntries))
                {
                    using var row = JsonDocument.Parse(line);
                }

                return null;
            }

            using var _ = JsonDocument.Parse(body);
            return null;
        }
        catch (JsonException)
        {
            return "a 2xx answer that is not JSON";
        }
    }

    /// <summary>A replay answer (JSON, NDJSON or CSV) in which at least one row has status "error".</summary>
    private static bool ReportsFailedRow(string? mediaType, string body)
    {
        switch (mediaType)
        {
            case "text/csv":
            {
                var records = CsvText.Records(body);
                int column = records.Count == 0 ? -1 : records[0].IndexOf("status");
                return column >= 0 && records.Skip(1).Any(cells => cells.Count > column && cells[column] == "error");
            }

            case "application/x-ndjson":
                return body.Split('\n', StringSplitOptions.RemoveEmptyEntries).Any(line =>
                {
                    using var row = JsonDocument.Parse(line);
                    return row.RootElement.TryGetProperty("status", out var s) && s.GetString() == "error";
                });

            default:
            {
                using var answer = JsonDocument.Parse(body);
                return answer.RootElement.TryGetProperty("failedRows", out var failed) && failed.GetInt64() > 0
                    && answer.RootElement.GetProperty("results").EnumerateArray().Any(r => r.GetProperty("status").GetString() == "error");
            }
        }
    }
}
