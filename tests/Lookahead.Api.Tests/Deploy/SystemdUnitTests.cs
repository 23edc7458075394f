using System.Globalization;
using Xunit;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>deploy/lookahead.service: systemd waits for the host's own shutdown before it kills the process.</summary>
[Collection(DeployFixture.Collection)]
public class SystemdUnitTests(DeployFixture deploy)
{
    [Fact]
    public void Stop_timeout_exceeds_the_hosts_shutdown_timeout()
    {
        foreach (string unit in deploy.Folder.SystemdUnits)
        {
            var lines = deploy.Folder.Read(unit).Split('\n');
            int index = Array.FindIndex(lines, l => l.StartsWith("TimeoutStopSec=", StringComparison.Ordinal));
            Assert.True(index >= 0, $"{unit}: no TimeoutStopSec, so systemd's default (90 s) applies; state it");

            var timeout = TimeSpan.FromSeconds(int.Parse(lines[index]["TimeoutStopSec=".Length..].Trim(), CultureInfo.InvariantCulture));

            Assert.True(
                timeout > deploy.Registrations.ShutdownTimeout,
                $"{unit}:{index + 1}: TimeoutStopSec {timeout.TotalSeconds} s does not exceed the host's shutdown timeout ({deploy.Registrations.ShutdownTimeout.TotalSeconds} s), so systemd would kill requests the host still lets finish");
        }
    }
}
