using System.Text.Json.Nodes;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>An endpoint that reads a JSON body, with a valid body to mutate.</summary>
/// <param name="Kind">Names the families made from it ("plan", "simulate", "step", …).</param>
/// <param name="Stateless">True when the endpoint stores nothing, so a mutation that happens to be valid may be answered.</param>
/// <param name="Required">Members whose absence (or null) is refused, each with the field the refusal names.</param>
public sealed record BodyTarget(string Kind, HttpMethod Method, string Path, JsonNode Body, bool Stateless, (string Member, string Named)[] Required)
{
    /// <summary>The JSON-body endpoints of the targets: plans (by id and by alias), simulations, estimates, a station's step, alias and station binding.</summary>
    public static IReadOnlyList<BodyTarget> All(HostileTargets targets)
    {
        var all = new List<BodyTarget>();
        foreach (var model in targets.Models)
        {
            all.Add(new("plan", HttpMethod.Post, $"/v1/models/{model.Id}/plan", model.Plan, true, [("state", "state")]));
            if (model.EstimatePlan is not null)
            {
                // Without its estimate a plan has no starting point: the refusal asks for a state (or an estimate).
                all.Add(new("plan", HttpMethod.Post, $"/v1/models/{model.Id}/plan", model.EstimatePlan, true, [("estimate", "state")]));
            }

            if (model.Simulate is not null)
            {
                all.Add(new("simulate", HttpMethod.Post, $"/v1/models/{model.Id}/simulate", model.Simulate, true, [("initialState", "initialState"), ("steps", "steps")]));
            }

            if (model.Estimate is not null)
            {
                all.Add(new("estimate", HttpMethod.Post, $"/v1/models/{model.Id}/estimate", model.Estimate, true, [("appliedInput", "appliedInput")]));
            }
        }

        all.Add(new("alias-plan", HttpMethod.Post, $"/v1/aliases/{HostileTargets.Alias}/plan", targets.Zones.Plan, true, [("state", "state")]));
        all.Add(new("step", HttpMethod.Post, $"/v1/stations/{HostileTargets.Station}/step", HostileTargets.StepBody(1, "2026-01-01T00:01:00Z"), false, [("sequence", "sequence")]));
        return all;
    }
}
