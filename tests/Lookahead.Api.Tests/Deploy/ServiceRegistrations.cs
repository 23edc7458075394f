using Lookahead.Api.Tests.Support;
using Microsoft.AspNetCore.TestHost;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.DependencyInjection.Extensions;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Options;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>
/// The service's own registrations, captured once from Program as the tests host it, so that a set of settings can
/// be put through exactly the options validation the service runs at start (ValidateOnStart: data annotations and
/// the extra rules such as "postgres needs a connection string") without starting a host or reaching a store.
/// </summary>
public sealed class ServiceRegistrations
{
    private readonly IReadOnlyList<ServiceDescriptor> descriptors;

    private ServiceRegistrations(IReadOnlyList<ServiceDescriptor> descriptors, ServiceSettingsSurface surface, TimeSpan shutdownTimeout)
    {
        this.descriptors = descriptors;
        Surface = surface;
        ShutdownTimeout = shutdownTimeout;
    }

    /// <summary>The keys the service reads, discovered on the same host.</summary>
    public ServiceSettingsSurface Surface { get; }

    /// <summary>How long the service's host waits for in-flight work after SIGTERM (HostOptions as the service resolves them).</summary>
    public TimeSpan ShutdownTimeout { get; }

    public static async Task<ServiceRegistrations> CaptureAsync()
    {
        IReadOnlyList<ServiceDescriptor>? captured = null;
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Demo:Enabled"] = "false" });
        var capturing = factory.WithWebHostBuilder(builder => builder.ConfigureTestServices(services => captured = [.. services]));
        var surface = ServiceSettingsSurface.Discover(capturing.Services);
        var shutdown = capturing.Services.GetRequiredService<IOptions<HostOptions>>().Value.ShutdownTimeout;
        return new ServiceRegistrations(captured ?? throw new InvalidOperationException("the service's registrations were not captured"), surface, shutdown);
    }

    /// <summary>
    /// Validates the service's options against <paramref name="appsettings"/> (the service's appsettings.json) overlaid by
    /// <paramref name="settings"/>; returns the failures (empty when the service would start with them).
    /// </summary>
    public IReadOnlyList<string> Validate(string appsettings, IReadOnlyDictionary<string, string?> settings)
    {
        var configuration = new ConfigurationBuilder()
            .AddJsonFile(appsettings, optional: false)
            .AddInMemoryCollection(settings)
            .Build();
        var services = new ServiceCollection();
        foreach (var descriptor in descriptors.Where(d => d.ServiceType != typeof(IConfiguration)))
        {
            services.Add(descriptor);
        }

        services.AddSingleton<IConfiguration>(configuration);
        using var provider = services.BuildServiceProvider();
        try
        {
            provider.GetRequiredService<IStartupValidator>().Validate();
            return [];
        }
        catch (OptionsValidationException ex)
        {
            return [.. ex.Failures];
        }
        catch (AggregateException ex)
        {
            return [.. ex.InnerExceptions.Select(e => e is OptionsValidationException o ? string.Join("; ", o.Failures) : e.Message)];
        }
        catch (InvalidOperationException ex)
        {
            // The binder's own failures: a value that does not convert to the property's type.
            return [ex.Message + (ex.InnerException is { } inner ? " " + inner.Message : "")];
        }
    }
}
