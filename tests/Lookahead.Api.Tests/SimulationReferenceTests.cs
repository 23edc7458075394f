using System.Net;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// A simulation of a model with an operating point answers its setpoint schedule in engineering units, once per step,
/// exactly as asked: a schedule row covers many steps, and each step's row is its own.
/// </summary>
public class SimulationReferenceTests
{
    [Fact]
    public async Task The_answered_references_are_the_schedule_in_engineering_units_however_many_steps_a_row_covers()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = (await (await client.GetAsync("/v1/aliases/cold-store-demo")).ReadJsonAsync())["modelId"]!.GetValue<string>();

        var response = await client.PostJsonAsync($"/v1/models/{id}/simulate", """
            {"initialState":[-18.5,-18.5,-18.5],"steps":6,"previousInput":[0,0,0],
             "references":[{"fromStep":0,"reference":[-20,-20.5,-21]},{"fromStep":4,"reference":[-21,-21,-21.5]}]}
            """);
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var references = (await response.ReadJsonAsync())["references"]!.AsArray()
            .Select(row => row!.AsArray().Select(v => v!.GetValue<double>()).ToArray()).ToList();

        Assert.Equal(6, references.Count);
        for (int k = 0; k < 4; k++)
        {
            Assert.Equal([-20, -20.5, -21], references[k]);
        }

        Assert.Equal([-21, -21, -21.5], references[4]);
        Assert.Equal([-21, -21, -21.5], references[5]);
    }
}
