using System.Threading.RateLimiting;
using Lookahead.Api.Access;
using Lookahead.Api.Catalog;
using Lookahead.Api.Http;
using Lookahead.Api.Storage;
using Microsoft.AspNetCore.Http.Json;
using Microsoft.AspNetCore.HttpOverrides;
using Microsoft.AspNetCore.Server.Kestrel.Core;
using Microsoft.Extensions.Options;
using OpenTelemetry;
using OpenTelemetry.Exporter;
using OpenTelemetry.Resources;
using OpenTelemetry.Trace;
using Prometheus;

namespace Lookahead.Api.Hosting;

/// <summary>Service registrations, grouped by concern.</summary>
public static class ServiceCollectionExtensions
{
    /// <summary>Longest request line (method, path with query, version) Kestrel reads before refusing it with 414.</summary>
    public const int MaxRequestLineBytes = 16 * 1024;

    /// <summary>
    /// Everything the features stand on: options, JSON, problems, rate limiting, OpenAPI, metrics registry, store,
    /// catalog, demo and health checks. Features register their own services (Add… in their folders).
    /// </summary>
    public static IServiceCollection AddLookaheadHosting(this IServiceCollection services)
    {
        // Requests already run in parallel; a registration's compile must not take every core from running
        // plans through MathNet's own parallel products, so the numeric library stays on the calling thread.
        MathNet.Numerics.Control.UseSingleThread();
        services.AddLookaheadOptions();
        services.AddLookaheadJson();
        services.AddLookaheadStore();
        services.AddLookaheadProblems();
        services.AddLookaheadRateLimiting();
        services.AddLookaheadOpenApi();
        services.AddLookaheadTracing();
        services.AddLookaheadCompression();
        services.AddLookaheadCors();
        services.AddSingleton(TimeProvider.System);

        // One registry per application instance, so two hosts in one process (as in tests) never share counters.
        // Runtime figures (GC collections, heap and working set, threads, CPU) sit beside the service's own.
        services.AddSingleton(_ =>
        {
            var registry = Metrics.NewCustomRegistry();
            DotNetStats.Register(registry);
            return registry;
        });
        services.AddSingleton<RequestBodyReader>();
        services.AddSingleton<QueryParameterGuard>();
        services.AddCatalog();
        services.AddSingleton<Aliases.AliasResolver>();
        services.AddHostedService<DemoModelSeeder>();
        // One instance for the life of the host: it remembers whether the store was unreachable at the last probe,
        // so an outage is logged once, not once per probe.
        services.AddSingleton<StoreHealthCheck>();
        services.AddHealthChecks().AddCheck<StoreHealthCheck>("store", tags: ["ready"]);
        return services;
    }

    private static void AddLookaheadOptions(this IServiceCollection services)
    {
        services.AddOptions<StoreOptions>().BindConfiguration(StoreOptions.Section).ValidateDataAnnotations()
            .Validate(o => o.Provider != "postgres" || !string.IsNullOrWhiteSpace(o.PostgresConnectionString), "Store:PostgresConnectionString is required when Store:Provider is 'postgres'")
            .ValidateOnStart();
        services.AddOptions<RequestLimitsOptions>().BindConfiguration(RequestLimitsOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        services.AddOptions<RateLimitingOptions>().BindConfiguration(RateLimitingOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        services.AddOptions<ProxyOptions>().BindConfiguration(ProxyOptions.Section)
            .Validate(o => o.Addresses.All(a => System.Net.IPAddress.TryParse(a, out _)), "Proxies:Addresses must be IP addresses")
            .ValidateOnStart();
        services.AddOptions<ForwardedHeadersOptions>().Configure<IOptions<ProxyOptions>>((forwarded, proxies) =>
        {
            forwarded.ForwardedHeaders = ForwardedHeaders.XForwardedFor | ForwardedHeaders.XForwardedProto;
            forwarded.KnownProxies.Clear();
            forwarded.KnownIPNetworks.Clear();
            foreach (var address in proxies.Value.Addresses)
            {
                forwarded.KnownProxies.Add(System.Net.IPAddress.Parse(address));
            }
        });
        services.AddOptions<DemoOptions>().BindConfiguration(DemoOptions.Section).ValidateDataAnnotations()
            .Validate(o => AliasName.IsWellFormed(o.Alias), $"Demo:Alias must match {AliasName.Pattern}")
            .Validate(o => o.Tenant.Length == 0 || Access.Tenants.IsWellFormed(o.Tenant), $"Demo:Tenant {Access.Tenants.Rule}, or be empty for the default tenant")
            .ValidateOnStart();

        services.AddOptions<ShutdownOptions>().BindConfiguration(ShutdownOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        services.AddOptions<HostOptions>().Configure<IOptions<ShutdownOptions>>((host, shutdown) =>
            host.ShutdownTimeout = TimeSpan.FromSeconds(shutdown.Value.GraceSeconds));

        // Kestrel enforces the ordinary body limit itself; replay raises it per request.
        services.AddOptions<KestrelServerOptions>().Configure<IOptions<RequestLimitsOptions>>((kestrel, limits) =>
        {
            kestrel.Limits.MaxRequestBodySize = limits.Value.MaxBodyBytes;
            kestrel.AddServerHeader = false;

            // Kestrel answers a request line over its limit (8 KiB by default) itself, with a bare 414 and no problem
            // document. Ids and names are at most 64 characters, but a much longer one must still reach the route to be
            // refused naming the field: 16 KiB lets a 10,000-character id through; longer lines keep Kestrel's 414.
            kestrel.Limits.MaxRequestLineSize = MaxRequestLineBytes;
        });
    }

    /// <summary>
    /// gzip and Brotli for clients that ask (Accept-Encoding): plan trajectories, simulations, replays and charts are
    /// long runs of digits that shrink several times over. The fastest level, since these answers are on hot paths.
    /// </summary>
    private static void AddLookaheadCompression(this IServiceCollection services)
    {
        services.AddResponseCompression(o =>
        {
            // The answers hold no secret beside text an attacker chooses, so compressing over TLS gives nothing away.
            o.EnableForHttps = true;
            o.Providers.Add<Microsoft.AspNetCore.ResponseCompression.BrotliCompressionProvider>();
            o.Providers.Add<Microsoft.AspNetCore.ResponseCompression.GzipCompressionProvider>();
            o.MimeTypes = ["application/json", "application/problem+json", "application/x-ndjson", "text/csv", "image/svg+xml", "text/plain"];
        });
        services.Configure<Microsoft.AspNetCore.ResponseCompression.BrotliCompressionProviderOptions>(o => o.Level = System.IO.Compression.CompressionLevel.Fastest);
        services.Configure<Microsoft.AspNetCore.ResponseCompression.GzipCompressionProviderOptions>(o => o.Level = System.IO.Compression.CompressionLevel.Fastest);
    }

    /// <summary>Opt-in CORS: a default policy built from the "Cors" section, applied only when origins are listed.</summary>
    private static void AddLookaheadCors(this IServiceCollection services)
    {
        services.AddOptions<CorsSettings>().BindConfiguration(CorsSettings.Section).ValidateDataAnnotations()
            .Validate(o => o.OriginsWellFormed(), "Cors:AllowedOrigins must be origins such as https://tuning.example.net (scheme, host, optional port, no path) or \"*\"")
            .ValidateOnStart();
        services.AddCors();
        services.AddOptions<Microsoft.AspNetCore.Cors.Infrastructure.CorsOptions>().Configure<IOptions<CorsSettings>>((cors, settings) =>
        {
            var s = settings.Value;
            if (!s.Enabled)
            {
                return;
            }

            cors.AddDefaultPolicy(policy =>
            {
                if (s.AllowedOrigins.Contains("*"))
                {
                    policy.AllowAnyOrigin();
                }
                else
                {
                    policy.WithOrigins([.. s.AllowedOrigins]);
                }

                policy.WithMethods("GET", "HEAD", "POST", "PUT", "DELETE")
                    .WithHeaders("Authorization", "X-Api-Key", "Content-Type", "If-None-Match", "traceparent", "tracestate")
                    .WithExposedHeaders("ETag", "Location", "Retry-After", "trace-id")
                    .SetPreflightMaxAge(TimeSpan.FromSeconds(s.MaxAgeSeconds));
            });
        });
    }

    private static void AddLookaheadJson(this IServiceCollection services)
    {
        services.AddOptions<JsonOptions>().Configure<IOptions<RequestLimitsOptions>>((json, limits) => ApiJson.Configure(json.SerializerOptions, limits.Value));
        services.AddJsonContext(HttpJsonContext.Default);

        // Query and route binding failures become problem documents instead of bare 400s.
        services.Configure<RouteHandlerOptions>(o => o.ThrowOnBadRequest = true);
    }

    private static void AddLookaheadStore(this IServiceCollection services)
    {
        // Behind the fault boundary: whatever the provider, an unreachable or unwritable store answers 503, never 500.
        services.AddSingleton<IModelStore>(sp =>
        {
            var options = sp.GetRequiredService<IOptions<StoreOptions>>().Value;
            if (options.Provider == "postgres")
            {
                return new StoreFaultBoundary(new PostgresModelStore(options.PostgresConnectionString!, options.PostgresSchema));
            }

            var environment = sp.GetRequiredService<IHostEnvironment>();
            var path = Path.IsPathRooted(options.SqlitePath) ? options.SqlitePath : Path.Combine(environment.ContentRootPath, options.SqlitePath);
            return new StoreFaultBoundary(new SqliteModelStore(path));
        });

        // Before any other hosted service touches the store.
        services.AddHostedService<StoreStartupCheck>();
    }

    private static void AddLookaheadProblems(this IServiceCollection services)
    {
        services.AddProblemDetails(o => o.CustomizeProblemDetails = context =>
        {
            var problem = context.ProblemDetails;
            problem.Instance ??= context.HttpContext.Request.Path;
            problem.Extensions["traceId"] = TraceContext.Id(context.HttpContext);
            if (problem.Status == StatusCodes.Status415UnsupportedMediaType && !problem.Extensions.ContainsKey("errors"))
            {
                // Routing refused the content type before any handler ran: say what the route takes, as handlers do.
                var ours = ApiProblems.UnsupportedMediaTypeDetails(context.HttpContext.Request.ContentType, AcceptedContentTypes.For(context.HttpContext));
                (problem.Type, problem.Title, problem.Detail) = (ours.Type, ours.Title, ours.Detail);
                problem.Extensions["errors"] = ours.Extensions["errors"];
            }
            else if (!problem.Extensions.ContainsKey("errors"))
            {
                // Status-code pages (unknown route, wrong method) carry the same shape as every other problem.
                problem.Extensions["errors"] = new List<ProblemError>();
                problem.Type = ProblemTypes.Http;
            }
        });
        services.AddExceptionHandler<ProblemExceptionHandler>();
    }

    /// <summary>
    /// Every request becomes a span in the caller's W3C trace (or a new one), so its trace id exists for problems, logs
    /// and the response header; spans leave the process only when an OTLP endpoint is configured.
    /// </summary>
    private static void AddLookaheadTracing(this IServiceCollection services)
    {
        services.AddOptions<TelemetryOptions>().BindConfiguration(TelemetryOptions.Section)
            .Validate(o => o.OtlpTracesEndpoint is null || Uri.TryCreate(o.OtlpTracesEndpoint, UriKind.Absolute, out _), "Telemetry:OtlpTracesEndpoint must be an absolute URI")
            .ValidateOnStart();
        services.AddOpenTelemetry()
            .ConfigureResource(r => r.AddService("lookahead"))
            .WithTracing(tracing => tracing
                .AddAspNetCoreInstrumentation(o => o.Filter = context =>
                    !context.Request.Path.StartsWithSegments("/health") && !context.Request.Path.StartsWithSegments("/metrics"))
                .AddProcessor(sp =>
                {
                    var options = sp.GetRequiredService<IOptions<TelemetryOptions>>().Value;
                    if (options.OtlpTracesEndpoint is not { } endpoint)
                    {
                        return new NoExport();
                    }

                    var exporter = new OtlpTraceExporter(new OtlpExporterOptions { Endpoint = new Uri(endpoint), Protocol = OtlpExportProtocol.HttpProtobuf });
                    return new BatchActivityExportProcessor(exporter);
                }));
    }

    /// <summary>Spans are made (for their ids) but go nowhere.</summary>
    private sealed class NoExport : BaseProcessor<System.Diagnostics.Activity>;

    private static void AddLookaheadRateLimiting(this IServiceCollection services)
    {
        // Per key when the request carries one (many stations behind one proxy share an address), else per address.
        static string Client(HttpContext context) =>
            AccessApi.KeyId(context) is { } key ? "key:" + key : context.Connection.RemoteIpAddress?.ToString() ?? "unknown";

        services.AddRateLimiter(o =>
        {
            o.RejectionStatusCode = StatusCodes.Status429TooManyRequests;

            // Solver work also holds one of the client's concurrency slots for as long as it runs (a replay: until its
            // last row is written). The global limiter sees every request; only routes marked as solver work count.
            o.GlobalLimiter = PartitionedRateLimiter.Create<HttpContext, string>(context =>
            {
                var settings = context.RequestServices.GetRequiredService<IOptions<RateLimitingOptions>>().Value;
                if (settings.SolverConcurrency == 0 || context.GetEndpoint()?.Metadata.GetMetadata<SolverWork>() is null)
                {
                    return RateLimitPartition.GetNoLimiter("other");
                }

                return RateLimitPartition.GetConcurrencyLimiter("solver:" + Client(context), _ => new ConcurrencyLimiterOptions
                {
                    PermitLimit = settings.SolverConcurrency,
                    QueueLimit = settings.SolverQueueLimit,
                    QueueProcessingOrder = QueueProcessingOrder.OldestFirst,
                });
            });
            o.AddPolicy(RateLimitPolicy.Name, context =>
            {
                var settings = context.RequestServices.GetRequiredService<IOptions<RateLimitingOptions>>().Value;
                return RateLimitPartition.GetFixedWindowLimiter(Client(context), _ => new FixedWindowRateLimiterOptions
                {
                    PermitLimit = settings.PermitLimit,
                    Window = TimeSpan.FromSeconds(settings.WindowSeconds),
                    QueueLimit = settings.QueueLimit,
                    QueueProcessingOrder = QueueProcessingOrder.OldestFirst,
                });
            });
            o.OnRejected = async (context, cancellationToken) =>
            {
                var problems = context.HttpContext.RequestServices.GetRequiredService<IProblemDetailsService>();

                // A window says when it reopens; a full set of solver slots does not, so the client is told to come back in a second.
                bool window = context.Lease.TryGetMetadata(MetadataName.RetryAfter, out var retryAfter);
                int seconds = window ? Math.Max(1, (int)Math.Ceiling(retryAfter.TotalSeconds)) : 1;
                context.HttpContext.Response.Headers.RetryAfter = seconds.ToString(System.Globalization.CultureInfo.InvariantCulture);
                string detail = window
                    ? "This client has used its request allowance for now; retry after the interval in Retry-After."
                    : "This client already has as many plans, replays, simulations and station steps running as it may (RateLimiting:SolverConcurrency) and as many waiting; retry after the interval in Retry-After.";
                await problems.WriteAsync(new ProblemDetailsContext
                {
                    HttpContext = context.HttpContext,
                    ProblemDetails = ApiProblems.Create(StatusCodes.Status429TooManyRequests, ProblemTypes.TooManyRequests, "Too many requests", detail),
                });
            };
        });
    }
}
