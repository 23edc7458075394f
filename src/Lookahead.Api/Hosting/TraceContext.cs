using System.Diagnostics;

namespace Lookahead.Api.Hosting;

/// <summary>
/// The request's W3C trace id: from the caller's traceparent when it sent one, else a new one. Problem documents,
/// log lines and the response header <see cref="HeaderName"/> carry it, so one id finds a request everywhere.
/// </summary>
public static class TraceContext
{
    public const string HeaderName = "trace-id";

    /// <summary>The trace id of the request being served (32 hex digits), or the connection's request id outside a trace.</summary>
    public static string Id(HttpContext context) =>
        Activity.Current is { } activity && activity.TraceId != default ? activity.TraceId.ToHexString() : context.TraceIdentifier;

    /// <summary>Writes the trace id header on every answer, including problems and status-code pages.</summary>
    public static IApplicationBuilder UseTraceIdHeader(this IApplicationBuilder app) => app.Use((context, next) =>
    {
        context.Response.OnStarting(() =>
        {
            context.Response.Headers[HeaderName] = Id(context);
            return Task.CompletedTask;
        });
        return next(context);
    });
}
