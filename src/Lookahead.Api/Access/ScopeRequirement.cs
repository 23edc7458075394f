using Microsoft.AspNetCore.Authorization;
using Microsoft.Extensions.Options;

namespace Lookahead.Api.Access;

/// <summary>A route's scope: met by a key holding it or <see cref="AccessScopes.Admin"/>, or by anyone when no keys are configured.</summary>
public sealed record ScopeRequirement(string Scope) : IAuthorizationRequirement;

/// <summary>Decides <see cref="ScopeRequirement"/>.</summary>
public sealed class ScopeRequirementHandler(IOptions<AccessOptions> access) : AuthorizationHandler<ScopeRequirement>
{
    protected override Task HandleRequirementAsync(AuthorizationHandlerContext context, ScopeRequirement requirement)
    {
        // Without keys the service is open (and listens on loopback only, see AnonymousBindingGuard).
        if (access.Value.Keys.Count == 0
            || context.User.HasClaim(AccessScopes.ClaimType, requirement.Scope)
            || context.User.HasClaim(AccessScopes.ClaimType, AccessScopes.Admin))
        {
            context.Succeed(requirement);
        }

        return Task.CompletedTask;
    }
}
