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
        await using var store = ServiceStore.Sqlite();
        string id;
        using (var first = await ServiceProcess.StartAsync(store))
        {
            using var client = first.CreateClient();
            id = await client.RegisterAsync(TestModels.TwoTanks);

            // No graceful shutdown: the process dies right after the acknowledgement.
            await first.KillAsync();
        }

        using var second = await ServiceProcess.StartAsync(store);
        using var again = second.CreateClient();
        var plan = await again.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[0.5,-0.2]}""");

        Assert.Equal(HttpStatusCode.OK, plan.StatusCode);
        Assert.Equal(id, (await plan.ReadJsonAsync())["modelId"]!.GetValue<string>());
    }
}
