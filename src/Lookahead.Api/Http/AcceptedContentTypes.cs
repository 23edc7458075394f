using Microsoft.AspNetCore.Http.Metadata;
using Microsoft.AspNetCore.Routing.Template;

namespace Lookahead.Api.Http;

/// <summary>
/// The content types the routes at a request's path and method accept (their Accepts metadata). Routing refuses any
/// other type itself with a bare 415, before a handler runs; its problem document uses this list to say what to send.
/// </summary>
public static class AcceptedContentTypes
{
    public static IReadOnlyList<string> For(HttpContext context)
    {
        var sources = context.RequestServices.GetServices<EndpointDataSource>();
        var path = context.Request.Path.Value ?? "/";
        var accepted = new List<string>();
        foreach (var endpoint in sources.SelectMany(s => s.Endpoints).OfType<RouteEndpoint>())
        {
            var methods = endpoint.Metadata.GetMetadata<IHttpMethodMetadata>()?.HttpMethods;
            var accepts = endpoint.Metadata.GetMetadata<IAcceptsMetadata>();
            if (accepts is null || (methods is { Count: > 0 } && !methods.Contains(context.Request.Method, StringComparer.OrdinalIgnoreCase)))
            {
                continue;
            }

            var matcher = new TemplateMatcher(TemplateParser.Parse(endpoint.RoutePattern.RawText ?? "/"), []);
            if (matcher.TryMatch(path, []))
            {
                accepted.AddRange(accepts.ContentTypes.Where(t => !accepted.Contains(t, StringComparer.OrdinalIgnoreCase)));
            }
        }

        return accepted.Count > 0 ? accepted : ["application/json"];
    }
}
