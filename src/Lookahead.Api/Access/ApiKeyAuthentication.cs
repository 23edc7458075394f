using System.Security.Claims;
using System.Security.Cryptography;
using System.Text;
using System.Text.Encodings.Web;
using Lookahead.Api.Http;
using Microsoft.AspNetCore.Authentication;
using Microsoft.Extensions.Options;
using Serilog;

namespace Lookahead.Api.Access;

/// <summary>
/// Reads the key from "Authorization: Bearer …" or "X-Api-Key", hashes it and compares the hash with every configured
/// one in constant time. Refusals are problem documents (401 without a valid key, 403 without the scope). The key and
/// its hash are never logged; the request log carries a key id (the hash's first 12 digits), enough to tell keys apart.
/// </summary>
public sealed class ApiKeyAuthentication(
    IOptionsMonitor<AuthenticationSchemeOptions> options,
    ILoggerFactory logger,
    UrlEncoder encoder,
    IOptions<AccessOptions> access,
    IDiagnosticContext log)
    : AuthenticationHandler<AuthenticationSchemeOptions>(options, logger, encoder)
{
    public const string SchemeName = "api-key";
    public const string KeyHeader = "X-Api-Key";

    protected override Task<AuthenticateResult> HandleAuthenticateAsync()
    {
        string? presented = Presented(Request);
        if (presented is null)
        {
            return Task.FromResult(AuthenticateResult.NoResult());
        }

        Span<byte> hash = stackalloc byte[32];
        SHA256.HashData(Encoding.UTF8.GetBytes(presented), hash);
        ApiKeyOptions? match = null;
        foreach (var key in access.Value.Keys)
        {
            // Every configured key is compared, matched or not, so the time taken says nothing about which one.
            if (CryptographicOperations.FixedTimeEquals(hash, Convert.FromHexString(key.Hash!)) && match is null)
            {
                match = key;
            }
        }

        if (match is null)
        {
            return Task.FromResult(AuthenticateResult.Fail("unknown key"));
        }

        string keyId = match.Hash![..12];
        log.Set("KeyId", keyId);
        var claims = new List<Claim> { new(ClaimTypes.NameIdentifier, keyId) };
        claims.AddRange(match.Scopes.Select(s => new Claim(AccessScopes.ClaimType, s)));
        claims.Add(Tenants.Claim(match.Tenant ?? Tenants.Default));
        var principal = new ClaimsPrincipal(new ClaimsIdentity(claims, SchemeName));
        return Task.FromResult(AuthenticateResult.Success(new AuthenticationTicket(principal, SchemeName)));
    }

    protected override Task HandleChallengeAsync(AuthenticationProperties properties)
    {
        Response.Headers.WWWAuthenticate = "Bearer";
        bool given = Presented(Request) is not null;
        return WriteAsync(
            StatusCodes.Status401Unauthorized,
            "Not authenticated",
            given ? "The API key is not one this service knows." : $"Send an API key as 'Authorization: Bearer <key>' or '{KeyHeader}: <key>'.");
    }

    protected override Task HandleForbiddenAsync(AuthenticationProperties properties)
    {
        string needed = Context.GetEndpoint()?.Metadata.GetMetadata<Microsoft.AspNetCore.Authorization.IAuthorizeData>()?.Policy ?? "another scope";
        return WriteAsync(StatusCodes.Status403Forbidden, "Not allowed", $"This key lacks the scope '{needed}' (or '{AccessScopes.Admin}') this request needs.");
    }

    private static string? Presented(HttpRequest request)
    {
        string? authorization = request.Headers.Authorization;
        if (authorization is not null && authorization.StartsWith("Bearer ", StringComparison.OrdinalIgnoreCase))
        {
            return authorization["Bearer ".Length..].Trim();
        }

        string? header = request.Headers[KeyHeader];
        return string.IsNullOrEmpty(header) ? null : header.Trim();
    }

    private async Task WriteAsync(int status, string title, string detail)
    {
        Response.StatusCode = status;
        var problems = Context.RequestServices.GetRequiredService<IProblemDetailsService>();
        await problems.WriteAsync(new ProblemDetailsContext
        {
            HttpContext = Context,
            ProblemDetails = ApiProblems.Create(status, status == 401 ? ProblemTypes.Unauthenticated : ProblemTypes.Forbidden, title, detail),
        });
    }
}
