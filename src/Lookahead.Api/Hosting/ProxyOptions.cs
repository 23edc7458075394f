namespace Lookahead.Api.Hosting;

/// <summary>
/// Proxies ("Proxies" section) whose X-Forwarded-For and X-Forwarded-Proto are believed. Only these: a forwarded
/// header from anyone else is ignored, since it would let a client choose the address its rate limit counts against.
/// </summary>
public sealed class ProxyOptions
{
    public const string Section = "Proxies";

    /// <summary>IP addresses of the load balancers in front of the service (e.g. the nginx host).</summary>
    public List<string> Addresses { get; set; } = [];
}
