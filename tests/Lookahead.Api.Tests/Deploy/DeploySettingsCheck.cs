namespace Lookahead.Api.Tests.Deploy;

/// <summary>The settings check itself, apart from the tests, so a test can also prove it fails on a bad folder.</summary>
public static class DeploySettingsCheck
{
    /// <summary>One message per setting that neither the service reads nor the planned list allows, with file and line.</summary>
    public static IReadOnlyList<string> UnreadSettings(IEnumerable<ServiceUnit> units, ServiceSettingsSurface surface, IReadOnlyList<(SettingPattern Pattern, int Line)> planned) =>
        [.. units.SelectMany(u => u.Settings)
            .DistinctBy(s => (s.Source, s.Key))
            .Where(s => !surface.Reads(s.Key) && !planned.Any(p => p.Pattern.Matches(s.Key)))
            .Select(s => $"{s.Source}: {s.WrittenAs} sets '{s.Key}', which the service does not read")];

    /// <summary>One message per ASPNETCORE_/DOTNET_ variable outside <see cref="EnvironmentVariableName.HostVariables"/>.</summary>
    public static IReadOnlyList<string> UnknownHostVariables(IEnumerable<ServiceUnit> units) =>
        [.. units.SelectMany(u => u.HostVariables)
            .DistinctBy(s => (s.Source, s.Key))
            .Where(s => !EnvironmentVariableName.HostVariables.Contains(s.Key))
            .Select(s => $"{s.Source}: {s.Key} is a host or runtime variable the deploy check does not know; add it to EnvironmentVariableName.HostVariables with what reads it, or remove it")];

    /// <summary>
    /// Runs the service's start-up options validation on each unit's settings over the service's appsettings.json
    /// (planned settings left out: nothing reads them yet). One message per failure, naming the unit.
    /// </summary>
    public static IReadOnlyList<string> InvalidSettings(IEnumerable<ServiceUnit> units, ServiceRegistrations registrations, string appsettings, IReadOnlyList<(SettingPattern Pattern, int Line)> planned)
    {
        var messages = new List<string>();
        foreach (var unit in units)
        {
            var settings = unit.AsConfiguration()
                .Where(s => !planned.Any(p => p.Pattern.Matches(s.Key)))
                .ToDictionary(s => s.Key, s => s.Value, StringComparer.OrdinalIgnoreCase);
            messages.AddRange(registrations.Validate(appsettings, settings).Select(failure => $"{unit}: {failure}"));
        }

        return messages;
    }
}
