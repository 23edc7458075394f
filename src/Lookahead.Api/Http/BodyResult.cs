using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Http;

/// <summary>A parsed body or the problem that stopped it; handlers return the problem as is.</summary>
public readonly record struct BodyResult<T>(T? Value, ProblemHttpResult? Problem)
    where T : class
{
    public static BodyResult<T> Ok(T value) => new(value, null);

    public static BodyResult<T> Fail(ProblemHttpResult problem) => new(null, problem);
}
