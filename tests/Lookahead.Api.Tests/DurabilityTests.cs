using System.Net;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>Runs the built service as a real process: an acknowledged registration must survive SIGKILL.</summary>
public class DurabilityTests
{
    [Fact]
    public async Task A_registration_acknowledged_with_201_survives_sigkill_and_plans_after_restart()
    {
        var folder = Directory.CreateTempSubdirectory("lookahead-durability-").FullName;
        string database = Path.Combine(folder, "lookahead.db");
        try
        {
            string id;
            using (var first = await ServiceProcess.StartAsync(database))
            {
                using var client = new HttpClient { BaseAddress = first.Address, Timeout = TimeSpan.FromSeconds(20) };
                id = await client.RegisterAsync(TestModels.TwoTanks);

                // No graceful shutdown: the process dies right after the acknowledgement.
                first.Process.Kill();
                await first.Process.WaitForExitAsync();
            }

            using var second = await ServiceProcess.StartAsync(database);
            using var again = new HttpClient { BaseAddress = second.Address, Timeout = TimeSpan.FromSeconds(20) };
            var plan = await again.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[0.5,-0.2]}""");

            Assert.Equal(HttpStatusCode.OK, plan.StatusCode);
            Assert.Equal(id, (await plan.ReadJsonAsync())["modelId"]!.GetValue<string>());
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }
}
