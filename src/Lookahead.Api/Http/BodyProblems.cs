namespace Lookahead.Api.Http;

/// <summary>The problem responses every endpoint that reads a body for a model can give, declared once.</summary>
internal static class BodyProblems
{
    /// <summary>400 (bad field), 404 (unknown model or alias), 413 (body too large), 415 (wrong content type).</summary>
    public static RouteHandlerBuilder ProducesBodyProblemsForModel(this RouteHandlerBuilder builder) =>
        builder.ProducesLookupProblems().ProducesBodyProblems();

    /// <summary>400 (malformed id or name) and 404 (no such model or alias): every route that names one.</summary>
    public static RouteHandlerBuilder ProducesLookupProblems(this RouteHandlerBuilder builder) =>
        builder.ProducesProblem(StatusCodes.Status400BadRequest).ProducesProblem(StatusCodes.Status404NotFound);

    /// <summary>400, 413 and 415.</summary>
    public static RouteHandlerBuilder ProducesBodyProblems(this RouteHandlerBuilder builder) =>
        builder
            .ProducesProblem(StatusCodes.Status400BadRequest)
            .ProducesProblem(StatusCodes.Status413PayloadTooLarge)
            .ProducesProblem(StatusCodes.Status415UnsupportedMediaType);
}
