using System.Security.Claims;

namespace Lookahead.Api.Access;

/// <summary>
/// Which tenant a request acts for. Models, aliases and stations are stored per tenant; a key names its tenant in
/// Auth:Keys:N:Tenant, and requests without a key (a service run without keys) or keys without one act for the
/// default tenant, the empty string.
/// </summary>
public static class Tenants
{
    public const string Default = "";

    /// <summary>The claim a key's tenant travels under.</summary>
    public const string ClaimType = "tenant";

    public const string Rule = "must be 1 to 64 characters of letters, digits, '.', '_' or '-'";

    public static bool IsWellFormed(string tenant) =>
        tenant.Length is >= 1 and <= 64 && tenant.All(c => char.IsAsciiLetterOrDigit(c) || c is '.' or '_' or '-');

    /// <summary>The tenant the request acts for.</summary>
    public static string Of(HttpContext context) => context.User.FindFirst(ClaimType)?.Value ?? Default;

    /// <summary>
    /// Whose models the request may read and list: null (every tenant's) for a key with the admin scope, which reads
    /// and lists across tenants, else the request's own tenant. Writes always act for the request's own tenant.
    /// </summary>
    public static string? Reading(HttpContext context) =>
        context.User.HasClaim(AccessScopes.ClaimType, AccessScopes.Admin) ? null : Of(context);

    /// <summary>The key id recorded beside a change (null without keys).</summary>
    public static string? ChangedBy(HttpContext context) => AccessApi.KeyId(context);

    internal static Claim Claim(string tenant) => new(ClaimType, tenant);
}
