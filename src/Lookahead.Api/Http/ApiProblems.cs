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

    public static ProblemDetails MalformedJsonDetails(JsonErrorDescription description)
    {
        string where = description.Line is long line ? $" at line {line}, position {description.Position}" : "";
        var problem = Create(StatusCodes.Status400BadRequest, ProblemTypes.MalformedJson, "Malformed JSON", $"The body could not be read{where}.", [description.Error]);
        if (description.Line is long l)
        {
            problem.Extensions["line"] = l;
            problem.Extensions["position"] = description.Position;
        }

        return problem;
    }

    public static ProblemHttpResult MalformedJson(JsonErrorDescription description) => TypedResults.Problem(MalformedJsonDetails(description));

    public static ProblemDetails PayloadTooLargeDetails(long limit) =>
        Create(StatusCodes.Status413PayloadTooLarge, ProblemTypes.PayloadTooLarge, "Payload too large", $"The body is larger than the {limit} bytes accepted here.");

    public static ProblemHttpResult PayloadTooLarge(long limit) => TypedResults.Problem(PayloadTooLargeDetails(limit));

    public static ProblemHttpResult UnsupportedMediaType(string? given, params string[] accepted) =>
        TypedResults.Problem(Create(
            StatusCodes.Status415UnsupportedMediaType,
            ProblemTypes.UnsupportedMediaType,
            "Unsupported media type",
            $"Content-Type '{given ?? "(none)"}' is not accepted here; send {string.Join(" or ", accepted)}.",
            [new ProblemError("Content-Type", $"must be {string.Join(" or ", accepted)}")]));

    public static ProblemError ToProblemError(ValidationError error) => new(error.Path, error.Reason);

    public static string Shorten(string value) => value.Length <= 80 ? value : value[..80] + "…";
}
