using Xunit;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>Every setting deploy/ gives the service is one the service reads, with a value it accepts.</summary>
[Collection(DeployFixture.Collection)]
public class DeploySettingsTests(DeployFixture deploy)
{
    [Fact]
    public void Every_setting_deploy_sets_is_one_the_service_reads()
    {
        Assert.NotEmpty(deploy.Units.SelectMany(u => u.Settings));

        var unread = DeploySettingsCheck.UnreadSettings(deploy.Units, deploy.Registrations.Surface, PlannedSettings.Read());

        Assert.True(unread.Count == 0, string.Join(Environment.NewLine, unread));
    }

    [Fact]
    public void Host_and_runtime_variables_deploy_sets_are_exactly_the_known_ones()
    {
        var unknown = DeploySettingsCheck.UnknownHostVariables(deploy.Units);
        var unused = EnvironmentVariableName.HostVariables.Where(name => !deploy.Units.SelectMany(u => u.HostVariables).Any(s => s.Key == name))
            .Select(name => $"EnvironmentVariableName.HostVariables lists {name}, which no deploy file sets; remove it");

        var problems = unknown.Concat(unused).ToList();
        Assert.True(problems.Count == 0, string.Join(Environment.NewLine, problems));
    }

    [Fact]
    public void Every_way_deploy_runs_the_service_passes_its_startup_validation()
    {
        var invalid = DeploySettingsCheck.InvalidSettings(deploy.Units, deploy.Registrations, deploy.ServiceAppSettings, PlannedSettings.Read());

        Assert.True(invalid.Count == 0, string.Join(Environment.NewLine, invalid));
    }

    [Fact]
    public void The_check_finds_the_ways_deploy_runs_the_service()
    {
        var names = deploy.Units.Select(u => u.Name).ToList();

        Assert.Contains(names, n => n.StartsWith("image built by deploy/Dockerfile", StringComparison.Ordinal));
        Assert.Contains(names, n => n.StartsWith("compose service ", StringComparison.Ordinal));
        Assert.Contains(names, n => n.StartsWith("Kubernetes Deployment ", StringComparison.Ordinal));
        Assert.Contains(names, n => n.StartsWith("systemd unit ", StringComparison.Ordinal));
        Assert.Contains(names, n => n.StartsWith("appsettings overlay ", StringComparison.Ordinal));
    }

    [Fact]
    public void Every_key_of_the_services_own_appsettings_is_on_its_settings_surface()
    {
        // The surface is what the check trusts; the service's own defaults file must fit inside it.
        var appsettings = ServiceUnits.AppSettings("src/Lookahead.Api/appsettings.json", File.ReadAllText(deploy.ServiceAppSettings));

        var unread = appsettings.Settings.Where(s => !deploy.Registrations.Surface.Reads(s.Key)).Select(s => s.ToString()).ToList();

        Assert.True(unread.Count == 0, string.Join(Environment.NewLine, unread));
    }

    [Fact]
    public void Every_options_class_with_a_section_is_bound_by_the_service()
    {
        var surface = deploy.Registrations.Surface;

        Assert.Empty(surface.UnboundSectionTypes);
        Assert.Equal(
            ["Auth", "Cache", "Compile", "Cors", "Demo", "Diagnostics", "Limits", "Planning", "Proxies", "RateLimiting", "Replay", "Shutdown", "Stations", "Store", "Telemetry"],
            surface.Sections.Select(s => s.Section).Order(StringComparer.Ordinal));
    }

    [Fact]
    public void Planned_settings_are_not_read_yet_and_are_set_by_deploy()
    {
        var settings = deploy.Units.SelectMany(u => u.Settings).ToList();
        var problems = new List<string>();
        foreach (var (pattern, line) in PlannedSettings.Read())
        {
            var uses = settings.Where(s => pattern.Matches(s.Key)).ToList();
            if (uses.Count == 0)
            {
                problems.Add($"PlannedSettings.txt:{line}: no deploy file sets '{pattern}'; remove the line");
            }

            problems.AddRange(uses.Where(s => deploy.Registrations.Surface.Reads(s.Key))
                .Select(s => $"PlannedSettings.txt:{line}: the service now reads '{s.Key}' ({s.Source}); remove the line"));
        }

        Assert.True(problems.Count == 0, string.Join(Environment.NewLine, problems));
    }
}
