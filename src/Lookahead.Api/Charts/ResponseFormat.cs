using Lookahead.Api.Http;
using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Charts;

/// <summary>?format= on plan and simulate: JSON (default), an SVG chart or a CSV table of the trajectories.</summary>
public enum ResponseFormat
{
    Json,
    Svg,
    Csv,
}

public static class ResponseFormats
{
    public const string SvgContentType = "image/svg+xml";

    public static bool TryParse(string? value, out ResponseFormat format, out ProblemHttpResult? problem)
    {
        problem = null;
        switch (value)
        {
            case null or "" or "json":
                format = ResponseFormat.Json;
                return true;
            case "svg":
                format = ResponseFormat.Svg;
                return true;
            case "csv":
                format = ResponseFormat.Csv;
                return true;
            default:
                format = ResponseFormat.Json;
                problem = ApiProblems.Validation("format", "must be 'json', 'svg' or 'csv'");
                return false;
        }
    }
}
