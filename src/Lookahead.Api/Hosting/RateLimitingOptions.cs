using System.ComponentModel.DataAnnotations;

namespace Lookahead.Api.Hosting;

/// <summary>
/// Per-client fixed-window limit on the /v1 endpoints ("RateLimiting" section). The defaults are permissive:
/// they stop a runaway client, not a busy station.
/// </summary>
public sealed class RateLimitingOptions
{
    public const string Section = "RateLimiting";

    [Range(1, int.MaxValue)]
    public int PermitLimit { get; set; } = 200_000;

    [Range(1, 3600)]
    public int WindowSeconds { get; set; } = 1;

    [Range(0, 100_000)]
    public int QueueLimit { get; set; }
}
