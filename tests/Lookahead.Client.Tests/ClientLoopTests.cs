using System.Net;
using Lookahead.Client.Tests.Support;
using Xunit;

namespace Lookahead.Client.Tests;

/// <summary>Aliases, estimates, simulations and stations through the typed client, on the cold-store demo.</summary>
public class ClientLoopTests
{
    private static readonly double[] Reading = [-19.2, -19.6, -19.9];
    private static readonly double[] Held = [30.0, 30.0, 0.0];

    [Fact]
    public async Task An_alias_plans_like_its_model_and_records_its_history()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();
        string demo = await Demo.IdAsync(client);
        var request = new PlanRequest { State = [-17.5, -18.5, -19.5], PreviousInput = Held, Reference = VectorOrRows.Held(-20, -20, -20) };

        var alias = await client.SetAliasAsync("dock", demo);
        Assert.Equal(demo, alias.ModelId);
        var byAlias = await client.PlanWithAliasAsync("dock", request);
        var byId = await client.PlanAsync(demo, request);
        Assert.Equal("dock", byAlias.Alias);
        Assert.Equal(byId.FirstMove, byAlias.FirstMove);
        Assert.NotNull(byId.Target);

        var other = await client.RegisterModelAsync(Models.DoubleIntegrator());
        await client.SetAliasAsync("dock", other.Id);
        var read = await client.GetAliasAsync("dock");
        Assert.Equal(other.Id, read.ModelId);
        Assert.Equal([demo, other.Id], read.History.Select(h => h.ModelId));

        await client.DeleteAliasAsync("dock");
        var gone = await Assert.ThrowsAsync<LookaheadProblemException>(() => client.GetAliasAsync("dock"));
        Assert.Equal(HttpStatusCode.NotFound, gone.Status);
    }

    [Fact]
    public async Task A_schedule_and_a_forecast_plan_differently_from_held_values()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();
        string demo = await Demo.IdAsync(client);
        var held = new PlanRequest { State = [-17.5, -18.5, -19.5], PreviousInput = Held, Disturbance = VectorOrRows.Held(18) };
        var forecast = held with
        {
            Disturbance = VectorOrRows.Schedule([18], [19], [20], [22], [24], [25]),
            Reference = VectorOrRows.Schedule([-20, -20, -20], [-20, -20, -20], [-20.5, -20.5, -20.5]),
        };

        var a = await client.PlanAsync(demo, held);
        var b = await client.PlanAsync(demo, forecast);
        Assert.NotEqual(a.Cost, b.Cost);
        Assert.Equal(-20.5, b.Target!.Output[0], 6);
    }

    [Fact]
    public async Task An_estimate_fed_back_plans_from_the_estimate()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();
        string demo = await Demo.IdAsync(client);

        var first = await client.EstimateAsync(demo, new EstimateRequest { AppliedInput = Held, Measurement = Reading });
        Assert.True(first.Initialised);
        Assert.Contains(first.Warnings, w => w.Code == "estimate-initialised");
        Assert.Equal(3, first.Estimate.Disturbance.Length);

        var next = await client.EstimateAsync(demo, new EstimateRequest { Estimate = first.Estimate, AppliedInput = Held, Measurement = null });
        Assert.False(next.MeasurementUsed);
        Assert.Contains(next.Warnings, w => w.Code == "measurement-missing");

        var plan = await client.PlanAsync(demo, new PlanRequest { Estimate = next.Estimate, PreviousInput = Held });
        Assert.Equal(demo, plan.ModelId);
        Assert.Equal(3, plan.FirstMove.Length);
    }

    [Fact]
    public async Task A_simulation_returns_its_trajectories_and_its_chart()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();
        string demo = await Demo.IdAsync(client);
        var request = new SimulationRequest
        {
            InitialState = [-17.5, -18.5, -19.5],
            Steps = 20,
            PreviousInput = [20, 20, 0],
            References = [new ReferenceChange(0, [-20, -20, -20]), new ReferenceChange(10, [-21, -20.5, -20.5])],
            Feedback = "estimate",
            MeasurementNoise = new MeasurementNoise([0.02, 0.02, 0.02], 1),
        };

        var run = await client.SimulateAsync(demo, request);
        Assert.Equal(20, run.Steps);
        Assert.Equal(21, run.States.Length);
        Assert.Equal(20, run.Inputs.Length);
        Assert.Equal(21, run.Estimates!.Length);
        Assert.Equal(-20.0, run.References![0][0], 9);
        Assert.Equal(-20.0, run.References![9][2], 9);
        Assert.Equal(-21.0, run.References![10][0], 9);
        Assert.Equal(-20.5, run.References![19][1], 9);
        Assert.All(run.Inputs, u => Assert.All(u, v => Assert.InRange(v, -1e-9, 100 + 1e-9)));

        string svg = await client.SimulateChartAsync(demo, request);
        Assert.StartsWith("<svg", svg.TrimStart(), StringComparison.Ordinal);
    }

    [Fact]
    public async Task A_station_steps_in_sequence_and_a_stale_step_carries_the_current_sequence()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();
        var bound = await client.SetStationAsync("dock-loop", Demo.Alias);
        Assert.Equal(0, bound.Sequence);

        var first = await client.StepStationAsync("dock-loop", new StationStepRequest
        {
            Sequence = 0,
            Measurement = Reading,
            AppliedInput = Held,
            Disturbance = VectorOrRows.Held(15),
            Timestamp = DateTimeOffset.Parse("2026-12-02T06:00:00Z", System.Globalization.CultureInfo.InvariantCulture),
        });
        Assert.Equal(1, first.Sequence);
        Assert.Equal("optimal", first.Status);
        Assert.Equal(Held, first.AppliedInput);

        // The chillers may rise at most 20 %/min from the 30 % they held: a bumpless start.
        Assert.InRange(first.FirstMove![0], 30 - 1e-9, 50 + 1e-9);

        var stale = await Assert.ThrowsAsync<LookaheadProblemException>(() => client.StepStationAsync("dock-loop", new StationStepRequest { Sequence = 0, Measurement = Reading }));
        Assert.Equal(HttpStatusCode.Conflict, stale.Status);
        Assert.Equal(1, stale.Extensions["currentSequence"].GetInt64());

        var read = await client.GetStationAsync("dock-loop");
        Assert.Equal(1, read.Sequence);
        Assert.Equal(first.FirstMove, read.LastSuggestedMove);
        await client.DeleteStationAsync("dock-loop");
    }
}
