using Microsoft.AspNetCore.Authentication;

namespace Lookahead.Api.Access;

/// <summary>Keys, scopes and the policies routes name (one per scope).</summary>
public static class AccessApi
{
    public static IServiceCollection AddAccess(this IServiceCollection services)
    {
        services.AddOptions<AccessOptions>().BindConfiguration(AccessOptions.Section)
            .Validate(o => o.Keys.All(k => k.Hash is { } h && h.Length == 64 && h.All(c => c is (>= '0' and <= '9') or (>= 'a' and <= 'f'))),
                "Auth:Keys:*:Hash must be 64 lower-case hexadecimal digits (the SHA-256 of the key, never the key)")
            .Validate(o => o.Keys.All(k => k.Scopes.Count > 0 && k.Scopes.All(AccessScopes.All.Contains)),
                $"Auth:Keys:*:Scopes must name at least one of {string.Join(", ", AccessScopes.All.Order(StringComparer.Ordinal))}")
            .Validate(o => o.Keys.All(k => k.Tenant is null || Tenants.IsWellFormed(k.Tenant)), $"Auth:Keys:*:Tenant {Tenants.Rule}")
            .Validate(o => o.Keys.Select(k => k.Hash).Distinct(StringComparer.Ordinal).Count() == o.Keys.Count, "Auth:Keys holds the same hash twice")
            .ValidateOnStart();
        services.AddAuthentication(ApiKeyAuthentication.SchemeName).AddScheme<AuthenticationSchemeOptions, ApiKeyAuthentication>(ApiKeyAuthentication.SchemeName, null);
        services.AddSingleton<Microsoft.AspNetCore.Authorization.IAuthorizationHandler, ScopeRequirementHandler>();
        services.AddAuthorization(o =>
        {
            foreach (string scope in AccessScopes.All)
            {
                o.AddPolicy(scope, p => p.AddRequirements(new ScopeRequirement(scope)));
            }
        });
        return services;
    }

    /// <summary>The key id of the request (for per-key limits), or null when it carries no valid key.</summary>
    public static string? KeyId(HttpContext context) =>
        context.User.Identity?.IsAuthenticated == true ? context.User.FindFirst(System.Security.Claims.ClaimTypes.NameIdentifier)?.Value : null;
}

/// <summary>How a route names the scope it needs.</summary>
public static class ScopeConventions
{
    /// <summary>Requires <paramref name="scope"/> and declares the 401 and 403 problem answers in the OpenAPI document.</summary>
    public static TBuilder RequireScope<TBuilder>(this TBuilder builder, string scope)
        where TBuilder : IEndpointConventionBuilder =>
        builder.RequireAuthorization(scope).WithMetadata(
            new ProducesResponseTypeMetadata(StatusCodes.Status401Unauthorized, typeof(Microsoft.AspNetCore.Mvc.ProblemDetails), ["application/problem+json"]),
            new ProducesResponseTypeMetadata(StatusCodes.Status403Forbidden, typeof(Microsoft.AspNetCore.Mvc.ProblemDetails), ["application/problem+json"]));
}
