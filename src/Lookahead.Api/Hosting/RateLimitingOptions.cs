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

    /// <summary>
    /// Requests doing solver work (plans, replays, simulations, estimates, station steps) one client — one key, or one
    /// address without a key — may have running at once; 0 turns the limit off. It keeps one client's replays from
    /// taking every core from the others.
    /// </summary>
    [Range(0, 100_000)]
    public int SolverConcurrency { get; set; } = 32;

    /// <summary>Solver requests of one client that wait for a slot before the next is refused with 429.</summary>
    [Range(0, 100_000)]
    public int SolverQueueLimit { get; set; } = 256;
}
