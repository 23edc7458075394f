namespace Lookahead.Api.Tests.Deploy;

/// <summary>
/// One way deploy/ runs the service (the image alone, a compose service, a Kubernetes container, the systemd unit, an
/// appsettings overlay) and everything it sets for it, in the order the service would read it (later wins).
/// </summary>
/// <param name="Name">What runs, for messages: "compose service lookahead (deploy/compose.yaml:24)".</param>
/// <param name="Settings">Configuration keys and values.</param>
/// <param name="HostVariables">ASPNETCORE_/DOTNET_ variables, which the host and the runtime read instead.</param>
public sealed record ServiceUnit(string Name, IReadOnlyList<DeploySetting> Settings, IReadOnlyList<DeploySetting> HostVariables)
{
    /// <summary>The settings as the service's configuration would hold them (later sources win, keys ignore case).</summary>
    public IReadOnlyDictionary<string, string?> AsConfiguration()
    {
        var result = new Dictionary<string, string?>(StringComparer.OrdinalIgnoreCase);
        foreach (var setting in Settings)
        {
            result[setting.Key] = setting.Value;
        }

        return result;
    }

    public override string ToString() => Name;
}
