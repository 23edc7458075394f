using Lookahead.Core.Validation;
using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.AspNetCore.Mvc;

namespace Lookahead.Api.Http;

/// <summary>
/// Every refusal the service gives, as an RFC 9457 problem. All of them carry "errors", a list of
/// { path, reason } (empty when no single field is to blame).
/// </summary>
public static class ApiProblems
{
    public static ProblemDetails Create(int status, string type, string title, string detail, IEnumerable<ProblemError>? errors = null)
    {
        var problem = new ProblemDetails { Status = status, Type = type, Title = title, Detail = detail };
        problem.Extensions["errors"] = errors?.ToList() ?? [];
        return problem;
    }

    public static ProblemHttpResult Validation(IEnumerable<ProblemError> errors, string detail = "The request has invalid fields; see errors.") =>
        TypedResults.Problem(Create(StatusCodes.Status400BadRequest, ProblemTypes.Validation, "Invalid request", detail, errors));

    public static ProblemHttpResult Validation(IEnumerable<ValidationError> errors, string detail = "The request has invalid fields; see errors.") =>
        Validation(errors.Select(ToProblemError), detail);

    public static ProblemHttpResult Validation(string path, string reason) => Validation([new ProblemError(path, reason)]);

    /// <summary>A body the JSON reader refused: "malformed JSON" when it is not JSON at all, else a validation problem on the field.</summary>
    public static ProblemDetails JsonBodyDetails(JsonErrorDescription description)
    {
        string where = description.Line is long line ? $" at line {line}, position {description.Position}" : "";
        var problem = description.IsSyntax
            ? Create(StatusCodes.Status400BadRequest, ProblemTypes.MalformedJson, "Malformed JSON", $"The body is not valid JSON{where}.", [description.Error])
            : Create(StatusCodes.Status400BadRequest, ProblemTypes.Validation, "Invalid request", $"The body is JSON, but a field{where} has the wrong form; see errors.", [description.Error]);
        if (description.Line is long l)
        {
            problem.Extensions["line"] = l;
            problem.Extensions["position"] = description.Position;
        }

        return problem;
    }

    public static ProblemHttpResult JsonBody(JsonErrorDescription description) => TypedResults.Problem(JsonBodyDetails(description));

    public static ProblemDetails PayloadTooLargeDetails(long limit) =>
        Create(StatusCodes.Status413PayloadTooLarge, ProblemTypes.PayloadTooLarge, "Payload too large", $"The body is larger than the {limit} bytes accepted here.");

    public static ProblemHttpResult PayloadTooLarge(long limit) => TypedResults.Problem(PayloadTooLargeDetails(limit));

    public static ProblemHttpResult UnsupportedMediaType(string? given, params string[] accepted) =>
        TypedResults.Problem(UnsupportedMediaTypeDetails(given, accepted));

    /// <summary>
    /// Says what to send. A form-encoded body is almost always curl's -d without a Content-Type header, so that case
    /// names the header to add.
    /// </summary>
    public static ProblemDetails UnsupportedMediaTypeDetails(string? given, IReadOnlyList<string> accepted)
    {
        string send = string.Join(" or ", accepted.Select(a => "Content-Type: " + a));
        string detail = given is null
            ? $"The body has no Content-Type; send {send}."
            : $"Content-Type '{Shorten(given)}' is not accepted here; send {send}.";
        if (given?.StartsWith("application/x-www-form-urlencoded", StringComparison.OrdinalIgnoreCase) == true)
        {
            detail += $" (curl -d sends a form unless told otherwise: add -H '{send.Split(" or ")[0]}'.)";
        }

        return Create(
            StatusCodes.Status415UnsupportedMediaType,
            ProblemTypes.UnsupportedMediaType,
            "Unsupported media type",
            detail,
            [new ProblemError("Content-Type", $"must be {string.Join(" or ", accepted)}")]);
    }

    public static ProblemError ToProblemError(ValidationError error) => new(error.Path, error.Reason);

    public static string Shorten(string value) => value.Length <= 80 ? value : value[..80] + "…";
}
