using Lookahead.Api.Catalog;
using Lookahead.Api.Http;
using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Aliases;

/// <summary>The refusals about an alias name: malformed or unknown.</summary>
public static class AliasProblems
{
    public static ProblemHttpResult AliasNotFound(string name) =>
        TypedResults.Problem(ApiProblems.Create(StatusCodes.Status404NotFound, ProblemTypes.NotFound, "Alias not found", $"No alias named '{name}' exists.", [new ProblemError("name", "no alias with this name")]));

    public static ProblemHttpResult MalformedAlias(string name) =>
        TypedResults.Problem(ApiProblems.Create(
            StatusCodes.Status400BadRequest,
            ProblemTypes.Validation,
            "Malformed alias name",
            "An alias name is 1–64 characters: lower-case letters, digits, '.', '_' or '-', starting with a letter or digit.",
            [new ProblemError("name", $"'{ApiProblems.Shorten(name)}' does not match {AliasName.Pattern}")]));
}
