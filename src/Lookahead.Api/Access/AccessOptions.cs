namespace Lookahead.Api.Access;

/// <summary>
/// API keys ("Auth" section). Keys are configured by the SHA-256 of the key (64 hex digits), never the key itself.
/// With no keys every request is allowed, and the service then listens on loopback only unless
/// <see cref="AllowAnonymous"/> says anonymous use elsewhere is intended.
/// </summary>
public sealed class AccessOptions
{
    public const string Section = "Auth";

    public List<ApiKeyOptions> Keys { get; set; } = [];

    /// <summary>Allow a service without keys to listen on addresses other than loopback.</summary>
    public bool AllowAnonymous { get; set; }
}

/// <summary>One key: its hash and what it may do.</summary>
public sealed class ApiKeyOptions
{
    /// <summary>Lower-case hex SHA-256 of the key's UTF-8 bytes.</summary>
    public string? Hash { get; set; }

    /// <summary>Scopes: models:write, plans:run, stations:step, admin.</summary>
    public List<string> Scopes { get; set; } = [];

    /// <summary>
    /// The tenant the key acts for: its models, aliases and stations are invisible to keys of other tenants. Keys
    /// without one share the default tenant (where the demo is registered).
    /// </summary>
    public string? Tenant { get; set; }
}
