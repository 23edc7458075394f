using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Http;

/// <summary>The offset and limit of a listing (models, stations): both checked the same way, with one default.</summary>
public readonly record struct PageRequest(int Offset, int Limit)
{
    public const int DefaultLimit = 50;
    public const int MaxLimit = 500;

    /// <summary>The page asked for, or a problem naming each query parameter that is out of range.</summary>
    public static PageRequest Read(int? offset, int? limit, out ProblemHttpResult? problem)
    {
        var errors = new List<ProblemError>();
        if (offset < 0)
        {
            errors.Add(new("offset", "must be 0 or more"));
        }

        if (limit is < 1 or > MaxLimit)
        {
            errors.Add(new("limit", $"must be between 1 and {MaxLimit}"));
        }

        problem = errors.Count > 0 ? ApiProblems.Validation(errors) : null;
        return new PageRequest(offset ?? 0, limit ?? DefaultLimit);
    }
}
