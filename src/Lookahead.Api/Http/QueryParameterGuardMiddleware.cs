namespace Lookahead.Api.Http;

/// <summary>Runs <see cref="QueryParameterGuard"/> once the endpoint is chosen and the caller admitted.</summary>
public static class QueryParameterGuardMiddleware
{
    public static IApplicationBuilder UseQueryParameterGuard(this IApplicationBuilder app) =>
        app.Use(async (context, next) =>
        {
            var guard = context.RequestServices.GetRequiredService<QueryParameterGuard>();
            if (guard.Check(context) is { } error)
            {
                var problems = context.RequestServices.GetRequiredService<IProblemDetailsService>();
                context.Response.StatusCode = StatusCodes.Status400BadRequest;
                await problems.WriteAsync(new ProblemDetailsContext
                {
                    HttpContext = context,
                    ProblemDetails = ApiProblems.Create(StatusCodes.Status400BadRequest, ProblemTypes.Validation, "Invalid request", "The request has a query parameter this route does not take; see errors.", [error]),
                });
                return;
            }

            await next(context);
        });
}
