namespace Lookahead.Api.Tests.Deploy;

/// <summary>
/// What an environment variable set for the service means to it. The service reads every environment variable as
/// configuration twice over: with the <c>Lookahead__</c> prefix removed (HostBuilderExtensions) and, as every ASP.NET Core
/// application does, unprefixed; <c>__</c> stands for <c>:</c> either way. <c>ASPNETCORE_</c> and <c>DOTNET_</c> variables
/// go to the host and the runtime instead.
/// </summary>
public static class EnvironmentVariableName
{
    public const string Prefix = "Lookahead__";

    /// <summary>
    /// Host and runtime variables a deploy file may set. Each is read by the framework, not by the service's settings;
    /// keep this to what the deploy files really use.
    /// </summary>
    public static readonly IReadOnlySet<string> HostVariables = new HashSet<string>(StringComparer.Ordinal)
    {
        "ASPNETCORE_ENVIRONMENT", // picks appsettings.{Environment}.json and the host's environment name
        "ASPNETCORE_HTTP_PORTS", // set by the runtime base image; the Dockerfile clears it so that Urls alone decides
    };

    /// <summary>True for a name the host or runtime reads (<c>ASPNETCORE_…</c>, <c>DOTNET_…</c>), not the service's settings.</summary>
    public static bool IsHostOrRuntime(string name) =>
        name.StartsWith("ASPNETCORE_", StringComparison.Ordinal) || name.StartsWith("DOTNET_", StringComparison.Ordinal);

    /// <summary>The configuration key the service reads from <paramref name="name"/>: <c>Lookahead__A__B</c> and <c>A__B</c> both give <c>A:B</c>.</summary>
    public static string ToKey(string name)
    {
        string rest = name.StartsWith(Prefix, StringComparison.OrdinalIgnoreCase) ? name[Prefix.Length..] : name;
        return rest.Replace("__", ":", StringComparison.Ordinal);
    }
}
