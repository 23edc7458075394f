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
    public static void Watch(WebApplication app)
    {
        app.Lifetime.ApplicationStarted.Register(() =>
        {
            var access = app.Services.GetRequiredService<IOptions<AccessOptions>>().Value;
            var logger = app.Services.GetRequiredService<ILoggerFactory>().CreateLogger("Lookahead.Api.Access");
            var addresses = app.Services.GetRequiredService<IServer>().Features.Get<IServerAddressesFeature>()?.Addresses ?? [];
            if (access.Keys.Count > 0 || addresses.Count == 0)
            {
                return;
            }

            string exposed = string.Join(", ", addresses.Where(a => !IsLoopback(a)));
            if (exposed.Length == 0)
            {
                LoopbackOnly(logger);
            }
            else if (access.AllowAnonymous)
            {
                AnonymousAllowed(logger, exposed);
            }
            else
            {
                Refused(logger, exposed);
                Environment.ExitCode = 1;
                app.Lifetime.StopApplication();
            }
        });
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
