using Lookahead.Api.Http;
using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Models;

/// <summary>The refusals about a model id: malformed, unknown, or still in use.</summary>
public static class ModelProblems
{
    public static ProblemHttpResult MalformedId(string value, string path = "id") =>
        TypedResults.Problem(ApiProblems.Create(
            StatusCodes.Status400BadRequest,
            ProblemTypes.MalformedId,
            "Malformed model id",
            "A model id is the 64 lower-case hexadecimal digits of a SHA-256 hash.",
            [new ProblemError(path, $"'{ApiProblems.Shorten(value)}' is not 64 lower-case hexadecimal digits")]));

    public static ProblemHttpResult ModelNotFound(string id, string path = "id") =>
        TypedResults.Problem(ApiProblems.Create(StatusCodes.Status404NotFound, ProblemTypes.NotFound, "Model not found", $"No model with id {id} is registered.", [new ProblemError(path, "no model with this id")]));

    public static ProblemHttpResult ReferencedByAlias(string id, string alias) =>
        TypedResults.Problem(ApiProblems.Create(
            StatusCodes.Status409Conflict,
            ProblemTypes.Conflict,
            "Model is in use",
            $"Alias '{alias}' points at model {id}; point the alias elsewhere (PUT /v1/aliases/{alias}) or delete it first.",
            [new ProblemError("id", $"alias '{alias}' points at this model")]));
}
