using System.Net;
using Microsoft.AspNetCore.Hosting.Server;
using Microsoft.AspNetCore.Hosting.Server.Features;
using Microsoft.Extensions.Options;

namespace Lookahead.Api.Access;

/// <summary>
/// A service without keys answers anyone who can reach it, so by default it may only listen on loopback: once the
/// server has bound its addresses, any other address without keys (and without Auth:AllowAnonymous) stops the process
/// with exit code 1 and a message saying what to set.
/// </summary>
public static partial class AnonymousBindingGuard
{
    /// <summary>
    /// Before the server starts: the addresses the configuration asks for (urls, http_ports, Kestrel endpoints). False,
    /// with the reason logged, when they reach beyond loopback without keys and anonymous use is not allowed.
    /// </summary>
    public static bool Permits(WebApplication app)
    {
        var access = app.Services.GetRequiredService<IOptions<AccessOptions>>().Value;
        if (access.Keys.Count > 0)
        {
            return true;
        }

        var configuration = app.Configuration;
        var asked = (configuration["urls"] ?? "").Split(';', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries).ToList();
        foreach (var ports in new[] { configuration["http_ports"], configuration["https_ports"] })
        {
            asked.AddRange((ports ?? "").Split(';', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries).Select(p => $"http://+:{p}"));
        }

        asked.AddRange(configuration.GetSection("Kestrel:Endpoints").GetChildren().Select(e => e["Url"]).OfType<string>());
        return Decide(app, access, asked);
    }

    /// <summary>After the server has bound: the addresses it really listens on (a second look, for anything the configuration did not show).</summary>
    public static void Watch(WebApplication app)
    {
        app.Lifetime.ApplicationStarted.Register(() =>
        {
            var access = app.Services.GetRequiredService<IOptions<AccessOptions>>().Value;
            var addresses = app.Services.GetRequiredService<IServer>().Features.Get<IServerAddressesFeature>()?.Addresses ?? [];
            if (access.Keys.Count > 0 || addresses.Count == 0)
            {
                return;
            }

            if (!Decide(app, access, addresses))
            {
                Environment.ExitCode = 1;
                app.Lifetime.StopApplication();
            }
        });
    }

    private static bool Decide(WebApplication app, AccessOptions access, IEnumerable<string> addresses)
    {
        var logger = app.Services.GetRequiredService<ILoggerFactory>().CreateLogger("Lookahead.Api.Access");
        string exposed = string.Join(", ", addresses.Where(a => !IsLoopback(a)));
        if (exposed.Length == 0)
        {
            LoopbackOnly(logger);
            return true;
        }

        if (access.AllowAnonymous)
        {
            AnonymousAllowed(logger, exposed);
            return true;
        }

        Refused(logger, exposed);
        return false;
    }

    /// <summary>True for 127.0.0.0/8, ::1 and "localhost"; false for wildcards (+, *, 0.0.0.0, ::) and other hosts.</summary>
    public static bool IsLoopback(string address)
    {
        if (!Uri.TryCreate(address.Replace("://+", "://wildcard", StringComparison.Ordinal).Replace("://*", "://wildcard", StringComparison.Ordinal), UriKind.Absolute, out var uri))
        {
            return false;
        }

        string host = uri.Host.Trim('[', ']');
        return host.Equals("localhost", StringComparison.OrdinalIgnoreCase) || (IPAddress.TryParse(host, out var ip) && IPAddress.IsLoopback(ip));
    }

    [LoggerMessage(Level = LogLevel.Warning, Message = "No API keys are configured: every request is allowed, and the service listens on loopback only")]
    private static partial void LoopbackOnly(ILogger logger);

    [LoggerMessage(Level = LogLevel.Warning, Message = "No API keys are configured and Auth:AllowAnonymous is set: anyone reaching {Addresses} may use every endpoint")]
    private static partial void AnonymousAllowed(ILogger logger, string addresses);

    [LoggerMessage(Level = LogLevel.Critical, Message = "Refusing to serve {Addresses} without API keys: configure Auth:Keys (by SHA-256 hash), listen on loopback only, or set Auth:AllowAnonymous=true")]
    private static partial void Refused(ILogger logger, string addresses);
}
