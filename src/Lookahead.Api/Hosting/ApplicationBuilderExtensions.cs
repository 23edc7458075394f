using Lookahead.Api.Access;
using Lookahead.Api.Http;
using Microsoft.AspNetCore.Diagnostics.HealthChecks;
using Prometheus;
using Serilog;
using Serilog.Events;

namespace Lookahead.Api.Hosting;

/// <summary>The middleware pipeline and the endpoint map.</summary>
public static class ApplicationBuilderExtensions
{
    public static WebApplication UseLookaheadPipeline(this WebApplication app)
    {
        // Only with configured proxies: the middleware with an empty list would believe every sender.
        if (app.Services.GetRequiredService<Microsoft.Extensions.Options.IOptions<ProxyOptions>>().Value.Addresses.Count > 0)
        {
            app.UseForwardedHeaders();
        }

        app.UseTraceIdHeader();
        app.UseResponseCompression();
        // Outside the exception handler, so the line records the status the client got (a store fault's 503), not a 500.
        app.UseSerilogRequestLogging(o =>
        {
            // The configured logger, not the static one (left silent on purpose, so two hosts in one process never mix).
            o.Logger = app.Services.GetRequiredService<Serilog.ILogger>();
            o.MessageTemplate = "HTTP {RequestMethod} {RequestPath} responded {StatusCode} in {Elapsed:0.000} ms";
            o.EnrichDiagnosticContext = (log, context) =>
            {
                // The route template, not the path: ids and names stay out of the field a dashboard groups by.
                if (context.GetEndpoint() is RouteEndpoint endpoint)
                {
                    log.Set("RequestRoute", endpoint.RoutePattern.RawText);
                }

                log.Set("TraceId", TraceContext.Id(context));
            };
            o.GetLevel = (context, _, exception) =>
                exception is not null || context.Response.StatusCode is >= 500 and not StatusCodes.Status503ServiceUnavailable ? LogEventLevel.Error
                : context.Response.StatusCode == StatusCodes.Status503ServiceUnavailable ? LogEventLevel.Warning
                : context.Request.Path.StartsWithSegments("/health") || context.Request.Path.StartsWithSegments("/metrics") ? LogEventLevel.Verbose
                : LogEventLevel.Information;
        });
        app.UseExceptionHandler();
        app.UseStatusCodePages();
        app.UseTuningPage();
        var registry = app.Services.GetRequiredService<CollectorRegistry>();
        app.UseHttpMetrics(o => o.SetMetricFactory(Metrics.WithCustomRegistry(registry)));
        app.UseRouting();

        // Before authentication: a browser's preflight carries no key and is answered here.
        if (app.Services.GetRequiredService<Microsoft.Extensions.Options.IOptions<CorsSettings>>().Value.Enabled)
        {
            app.UseCors();
        }

        app.UseAuthentication();
        app.UseAuthorization();
        app.UseQueryParameterGuard();
        app.UseRateLimiter();
        app.UseSwaggerUI(o => o.SwaggerEndpoint($"/swagger/{OpenApiExtensions.DocumentName}/swagger.json", "Lookahead v1"));
        return app;
    }

    /// <summary>Liveness, readiness and the metrics scrape; the features map their own routes.</summary>
    /// <remarks>
    /// Both helpers map every method; probes and scrapers read, so anything but GET and HEAD is answered 405 like any
    /// other route's wrong method.
    /// </remarks>
    public static WebApplication MapHostingEndpoints(this WebApplication app)
    {
        var reads = new HttpMethodMetadata([HttpMethods.Get, HttpMethods.Head]);
        app.MapHealthChecks("/health/live", new HealthCheckOptions { Predicate = _ => false })
            .WithMetadata(reads).WithName("Live").WithSummary("The process is up (checks nothing else)").WithTags("Health");
        app.MapHealthChecks("/health/ready", new HealthCheckOptions { Predicate = check => check.Tags.Contains("ready") })
            .WithMetadata(reads).WithName("Ready").WithSummary("The store answers").WithTags("Health");
        app.MapSwagger().RequireScope(AccessScopes.Admin);
        app.MapMetrics("/metrics", app.Services.GetRequiredService<CollectorRegistry>())
            .RequireScope(AccessScopes.Admin)
            .WithMetadata(reads).WithName("Metrics").WithSummary("Prometheus metrics").WithTags("Health");
        return app;
    }
}
