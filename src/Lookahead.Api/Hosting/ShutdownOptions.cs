using System.ComponentModel.DataAnnotations;

namespace Lookahead.Api.Hosting;

/// <summary>
/// Graceful stop ("Shutdown" section). On SIGTERM the service stops accepting, lets in-flight requests finish for up
/// to the grace, then ends. A replay still running ends at once with a summary saying it was cut, inside the grace.
/// deploy/ gives systemd, compose and Kubernetes a longer stop timeout than this, so they never kill a stop in progress.
/// </summary>
public sealed class ShutdownOptions
{
    public const string Section = "Shutdown";

    [Range(1, 3600)]
    public int GraceSeconds { get; set; } = 25;
}
