using Lookahead.Api.Catalog;
using Lookahead.Api.Http;
using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Stations;

/// <summary>The refusals about a station: malformed or unknown name, a stale sequence.</summary>
public static class StationProblems
{
    public static ProblemHttpResult MalformedName(string name) =>
        TypedResults.Problem(ApiProblems.Create(
            StatusCodes.Status400BadRequest,
            ProblemTypes.Validation,
            "Malformed station name",
            "A station name is 1–64 characters: lower-case letters, digits, '.', '_' or '-', starting with a letter or digit.",
            [new ProblemError("name", $"'{ApiProblems.Shorten(name)}' does not match {AliasName.Pattern}")]));

    public static ProblemHttpResult NotFound(string name) =>
        TypedResults.Problem(ApiProblems.Create(StatusCodes.Status404NotFound, ProblemTypes.NotFound, "Station not found", $"No station named '{name}' exists.", [new ProblemError("name", "no station with this name")]));

    /// <summary>409 carrying the sequence the next step must give, as the extension member "currentSequence".</summary>
    public static ProblemHttpResult StaleSequence(string name, long given, long current)
    {
        var problem = ApiProblems.Create(
            StatusCodes.Status409Conflict,
            ProblemTypes.Conflict,
            "Stale sequence",
            $"Station '{name}' is at sequence {current}; this step gave {given}. Read the station, then step with its sequence.",
            [new ProblemError("sequence", $"is {given}; the station is at {current}")]);
        problem.Extensions["currentSequence"] = current;
        return TypedResults.Problem(problem);
    }
}
