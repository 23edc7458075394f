namespace Lookahead.Api.Access;

/// <summary>
/// What a key may do. Each route requires one scope; <see cref="Admin"/> holds every scope and alone opens the
/// metrics and the API explorer. Also the names of the authorization policies.
/// </summary>
public static class AccessScopes
{
    /// <summary>Register and delete models, set and delete aliases.</summary>
    public const string ModelsWrite = "models:write";

    /// <summary>Plan, replay, simulate, estimate, and read models and aliases.</summary>
    public const string PlansRun = "plans:run";

    /// <summary>Bind, read, step and delete stations.</summary>
    public const string StationsStep = "stations:step";

    /// <summary>Everything, plus /metrics and /swagger.</summary>
    public const string Admin = "admin";

    public static readonly IReadOnlySet<string> All = new HashSet<string>(StringComparer.Ordinal) { ModelsWrite, PlansRun, StationsStep, Admin };

    /// <summary>The claim type a key's scopes travel under.</summary>
    public const string ClaimType = "scope";
}
