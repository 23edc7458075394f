using Serilog;

namespace Lookahead.Api.Hosting;

/// <summary>Configuration sources and logging, set up before services are registered.</summary>
public static class HostBuilderExtensions
{
    /// <summary>
    /// Environment variables prefixed Lookahead__ (e.g. Lookahead__Store__SqlitePath) override appsettings;
    /// command-line arguments still win over everything.
    /// </summary>
    public static WebApplicationBuilder AddLookaheadConfiguration(this WebApplicationBuilder builder, string[] args)
    {
        builder.Configuration.AddEnvironmentVariables("Lookahead__");
        builder.Configuration.AddCommandLine(args);
        return builder;
    }

    /// <summary>Serilog from the "Serilog" section; request logs carry model id, status and solve time, never bodies.</summary>
    public static WebApplicationBuilder AddLookaheadLogging(this WebApplicationBuilder builder)
    {
        builder.Services.AddSerilog(
            (services, logger) => logger
                .ReadFrom.Configuration(builder.Configuration)
                .ReadFrom.Services(services)
                .Enrich.FromLogContext(),
            preserveStaticLogger: true);
        return builder;
    }
}
