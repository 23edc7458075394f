using Lookahead.Api.Contracts;
using Lookahead.Api.Json;
using Lookahead.Core.Validation;
using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.AspNetCore.Mvc;

namespace Lookahead.Api.Problems;

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

    public static ProblemHttpResult MalformedId(string value, string path = "id") =>
        TypedResults.Problem(Create(
            StatusCodes.Status400BadRequest,
            ProblemTypes.MalformedId,
            "Malformed model id",
            "A model id is the 64 lower-case hexadecimal digits of a SHA-256 hash.",
            [new ProblemError(path, $"'{Shorten(value)}' is not 64 lower-case hexadecimal digits")]));

    public static ProblemHttpResult ModelNotFound(string id, string path = "id") =>
        TypedResults.Problem(Create(StatusCodes.Status404NotFound, ProblemTypes.NotFound, "Model not found", $"No model with id {id} is registered.", [new ProblemError(path, "no model with this id")]));

    public static ProblemHttpResult AliasNotFound(string name) =>
        TypedResults.Problem(Create(StatusCodes.Status404NotFound, ProblemTypes.NotFound, "Alias not found", $"No alias named '{name}' exists.", [new ProblemError("name", "no alias with this name")]));

    public static ProblemHttpResult MalformedAlias(string name) =>
        TypedResults.Problem(Create(
            StatusCodes.Status400BadRequest,
            ProblemTypes.Validation,
            "Malformed alias name",
            "An alias name is 1–64 characters: lower-case letters, digits, '.', '_' or '-', starting with a letter or digit.",
            [new ProblemError("name", $"'{Shorten(name)}' does not match {Catalog.AliasName.Pattern}")]));

    public static ProblemHttpResult ReferencedByAlias(string id, string alias) =>
        TypedResults.Problem(Create(
            StatusCodes.Status409Conflict,
            ProblemTypes.Conflict,
            "Model is in use",
            $"Alias '{alias}' points at model {id}; point the alias elsewhere (PUT /v1/aliases/{alias}) or delete it first.",
            [new ProblemError("id", $"alias '{alias}' points at this model")]));

    public static ProblemError ToProblemError(ValidationError error) => new(error.Path, error.Reason);

    private static string Shorten(string value) => value.Length <= 80 ? value : value[..80] + "…";
}
