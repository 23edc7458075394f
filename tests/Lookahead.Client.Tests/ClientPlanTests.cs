using Lookahead.Client.Tests.Support;
using Xunit;

namespace Lookahead.Client.Tests;

/// <summary>Registering and planning through the typed client against the service in process.</summary>
public class ClientPlanTests
{
    [Fact]
    public async Task A_registered_model_plans_a_move_that_respects_its_limits()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();

        var registration = await client.RegisterModelAsync(Models.DoubleIntegrator());
        Assert.True(registration.Created);
        Assert.Matches("^[0-9a-f]{64}$", registration.Id);
        Assert.Equal(new ModelDimensions(2, 1, 2, 10, 10), registration.Dimensions);
        Assert.True(registration.Diagnostics.Controllable);

        var again = await client.RegisterModelAsync(Models.DoubleIntegrator());
        Assert.False(again.Created);
        Assert.Equal(registration.Id, again.Id);

        // Far from the origin the unconstrained move would exceed the force limit, so the plan must press on it.
        var plan = await client.PlanAsync(registration.Id, new PlanRequest { State = [5.0, 0.0] });
        Assert.Equal("optimal", plan.Status);
        Assert.Equal(10, plan.Inputs.Length);
        Assert.Equal(11, plan.States.Length);
        Assert.All(plan.Inputs, u => Assert.InRange(u[0], -1.0 - 1e-9, 1.0 + 1e-9));
        Assert.Equal(-1.0, plan.FirstMove[0], 9);
        Assert.Contains(plan.ActiveLimits, l => l.Kind == "input-min" && l.Step == 0);

        // The predicted states follow the plant from the measured state with the planned inputs.
        double[] x = [5.0, 0.0];
        for (int k = 0; k < plan.Inputs.Length; k++)
        {
            double u = plan.Inputs[k][0];
            x = [x[0] + 0.1 * x[1] + 0.005 * u, x[1] + 0.1 * u];
            Assert.Equal(x[0], plan.States[k + 1][0], 9);
            Assert.Equal(x[1], plan.States[k + 1][1], 9);
        }
    }
}
