using Microsoft.AspNetCore.Mvc.ApiExplorer;
using Microsoft.AspNetCore.Mvc.ModelBinding;

namespace Lookahead.Api.Http;

/// <summary>
/// Refuses a query parameter the route does not take, as an unknown body field is refused: a misspelt ?detial=full
/// would otherwise be ignored and the answer silently differ from what was asked. What a route takes is read from
/// what its handler really binds (the API explorer's parameters from the query), so a parameter a handler declares
/// is accepted with no list to keep in step. Routes the explorer does not describe (health, metrics, the document
/// itself) are left alone.
/// </summary>
public sealed class QueryParameterGuard(IApiDescriptionGroupCollectionProvider explorer)
{
    private readonly Lazy<Dictionary<(string Method, string Route), string[]>> allowed = new(() => Read(explorer));

    /// <summary>The query names the route takes, or null when the route is not described (nothing is checked).</summary>
    public IReadOnlyList<string>? AllowedFor(RouteEndpoint endpoint, string method) =>
        allowed.Value.TryGetValue((method.ToUpperInvariant(), Normalise(endpoint.RoutePattern.RawText)), out var names) ? names : null;

    /// <summary>The first query name the route does not take, as a problem, or null.</summary>
    public ProblemError? Check(HttpContext context)
    {
        if (context.GetEndpoint() is not RouteEndpoint endpoint || context.Request.Query.Count == 0 || AllowedFor(endpoint, context.Request.Method) is not { } names)
        {
            return null;
        }

        foreach (var key in context.Request.Query.Keys)
        {
            if (!names.Contains(key, StringComparer.Ordinal))
            {
                string takes = names.Count == 0 ? "this route takes no query parameters" : $"this route takes {string.Join(", ", names)}";
                string hint = DidYouMean.Closest(key, names) is { } close ? $"; did you mean '{close}'?" : "";
                return new ProblemError(ApiProblems.Shorten(key), $"is not a known query parameter{hint} ({takes}; names are case-sensitive)");
            }
        }

        return null;
    }

    private static Dictionary<(string, string), string[]> Read(IApiDescriptionGroupCollectionProvider explorer)
    {
        var map = new Dictionary<(string, string), string[]>();
        foreach (var description in explorer.ApiDescriptionGroups.Items.SelectMany(g => g.Items))
        {
            if (description.HttpMethod is not { } method || description.RelativePath is not { } path)
            {
                continue;
            }

            map[(method.ToUpperInvariant(), Normalise(path))] = [.. description.ParameterDescriptions
                .Where(p => p.Source == BindingSource.Query)
                .Select(p => p.Name)
                .Distinct(StringComparer.Ordinal)];
        }

        return map;
    }

    private static string Normalise(string? route) => "/" + (route ?? "").Trim('/');
}
