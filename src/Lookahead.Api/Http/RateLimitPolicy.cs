namespace Lookahead.Api.Http;

/// <summary>The rate-limit policy every /v1 route group requires; hosting defines what it allows.</summary>
public static class RateLimitPolicy
{
    public const string Name = "per-client";
}
