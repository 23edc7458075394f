using System.Globalization;
using System.Text.Json;
using Lookahead.Client.Tests.Support;
using Xunit;

namespace Lookahead.Client.Tests.Cli;

/// <summary>The command-line tool's register, plan, simulate and step against the service in process.</summary>
public class CliCommandTests
{
    private static readonly JsonSerializerOptions Json = new(JsonSerializerDefaults.Web) { DefaultIgnoreCondition = System.Text.Json.Serialization.JsonIgnoreCondition.WhenWritingNull };

    [Fact]
    public async Task Register_prints_the_id_the_service_gave_with_diagnostics_and_warnings()
    {
        await using var service = new ServiceFactory();
        using var folder = new TempFolder();
        string path = folder.File("model.json");
        await File.WriteAllTextAsync(path, JsonSerializer.Serialize(Models.DoubleIntegrator(), Json));

        var (exit, output) = await Support.Cli.RunAsync(service, "register", path);
        Assert.True(exit == 0, output);
        string id = Support.Cli.Line(output, "id");
        Assert.Matches("^[0-9a-f]{64}$", id);
        Assert.Equal("registered: new", output.Split('\n')[1].TrimEnd());
        Assert.Contains("dimensions: n=2 m=1 p=2 horizon=10", output, StringComparison.Ordinal);
        Assert.Contains("controllable", output, StringComparison.Ordinal);
        Assert.Contains("warnings: none", output, StringComparison.Ordinal);

        using var client = service.CreateLookaheadClient();
        Assert.Equal("double-integrator", (await client.GetModelAsync(id)).Document.Name);
    }

    [Fact]
    public async Task A_refused_registration_prints_each_field_path_and_exits_1()
    {
        await using var service = new ServiceFactory();
        using var folder = new TempFolder();
        string path = folder.File("bad.json");
        await File.WriteAllTextAsync(path, """{"plant":{"a":[[1]],"b":[[1]],"sampleTime":1,"timeDomain":"discrete"},"cost":{"horizn":5,"outputWeight":[1],"inputWeight":[1]}}""");

        var (exit, output) = await Support.Cli.RunAsync(service, "register", path);
        Assert.Equal(1, exit);
        Assert.Contains("refused: 400", output, StringComparison.Ordinal);
        Assert.Contains("cost.horizn:", output, StringComparison.Ordinal);
        Assert.Contains("trace: ", output, StringComparison.Ordinal);

        var (missing, said) = await Support.Cli.RunAsync(service, "register", folder.File("absent.json"));
        Assert.Equal(2, missing);
        Assert.Contains("could not be read", said, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Plan_by_alias_prints_the_move_the_service_plans()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();
        var expected = await client.PlanWithAliasAsync(Demo.Alias, new PlanRequest { State = [-17.5, -18.5, -19.5], PreviousInput = [30, 30, 0] });

        var (exit, output) = await Support.Cli.RunAsync(service, "plan", Demo.Alias, "--state=-17.5,-18.5,-19.5", "--previous-input=30,30,0");
        Assert.True(exit == 0, output);
        Assert.Equal("optimal", Support.Cli.Line(output, "status"));
        Assert.Equal(expected.ModelId, Support.Cli.Line(output, "model"));
        var move = Support.Cli.Line(output, "first move").Split(", ").Select(v => double.Parse(v, CultureInfo.InvariantCulture)).ToArray();
        Assert.Equal(3, move.Length);
        for (int j = 0; j < 3; j++)
        {
            Assert.Equal(expected.FirstMove[j], move[j], 8);
        }

        // By id, with the service's chart beside it.
        using var folder = new TempFolder();
        var (byId, byIdOutput) = await Support.Cli.RunAsync(service, "plan", expected.ModelId, "--state=-17.5,-18.5,-19.5", "--previous-input=30,30,0", "--svg", folder.File("plan.svg"));
        Assert.True(byId == 0, byIdOutput);
        Assert.Equal(Support.Cli.Line(output, "first move"), Support.Cli.Line(byIdOutput, "first move"));
        Assert.StartsWith("<svg", (await File.ReadAllTextAsync(folder.File("plan.svg"))).TrimStart(), StringComparison.Ordinal);

        var (bad, said) = await Support.Cli.RunAsync(service, "plan", Demo.Alias, "--state=-17.5,oops,-19.5");
        Assert.Equal(2, bad);
        Assert.Contains("'oops' is not a number", said, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Simulate_writes_the_services_chart_and_a_csv_of_the_run()
    {
        await using var service = new ServiceFactory();
        using var folder = new TempFolder();
        using var client = service.CreateLookaheadClient();
        var request = new SimulationRequest
        {
            InitialState = [-17.5, -18.5, -19.5],
            Steps = 30,
            PreviousInput = [20, 20, 0],
            References = [new ReferenceChange(0, [-20, -20, -20]), new ReferenceChange(15, [-21.5, -21, -21])],
        };
        string requestPath = folder.File("run.json");
        await File.WriteAllTextAsync(requestPath, JsonSerializer.Serialize(request, Json));

        var (svgExit, svgOutput) = await Support.Cli.RunAsync(service, "simulate", Demo.Alias, requestPath, "--out", folder.File("run.svg"));
        Assert.True(svgExit == 0, svgOutput);
        Assert.StartsWith("<svg", (await File.ReadAllTextAsync(folder.File("run.svg"))).TrimStart(), StringComparison.Ordinal);

        var (csvExit, csvOutput) = await Support.Cli.RunAsync(service, "simulate", Demo.Alias, requestPath, "-o", folder.File("run.csv"));
        Assert.True(csvExit == 0, csvOutput);
        var lines = await File.ReadAllLinesAsync(folder.File("run.csv"));
        var header = lines[0].Split(',');
        Assert.Equal(["step", "time_s", "zone_a", "zone_b", "zone_c", "r_zone_a", "r_zone_b", "r_zone_c", "chiller_1", "chiller_2", "door_fan"], header[..11]);
        Assert.Contains("x_zone_a_temp", header);
        Assert.Equal(32, lines.Length);

        var run = await client.SimulateAsync(await Demo.IdAsync(client), request);
        for (int k = 0; k <= 30; k++)
        {
            var fields = lines[k + 1].Split(',');
            Assert.Equal(k * 60.0, Number(fields[1]));
            Assert.Equal(run.Outputs[k][1], Number(fields[Array.IndexOf(header, "zone_b")]), 12);
            if (k < 30)
            {
                Assert.Equal(run.Inputs[k][0], Number(fields[Array.IndexOf(header, "chiller_1")]), 12);
                Assert.Equal(k < 15 ? -20.0 : -21.5, Number(fields[Array.IndexOf(header, "r_zone_a")]), 9);
            }
            else
            {
                Assert.Equal("", fields[Array.IndexOf(header, "chiller_1")]);
            }
        }

        var (strict, said) = await Support.Cli.RunAsync(service, "simulate", Demo.Alias, WriteFile(folder, "typo.json", """{"initialState":[-20,-20,-20],"steps":3,"refrences":[]}"""), "-o", folder.File("x.csv"));
        Assert.Equal(2, strict);
        Assert.Contains("refrences", said, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Step_binds_a_station_steps_it_and_reads_the_next_sequence_by_itself()
    {
        await using var service = new ServiceFactory();

        var (exit, output) = await Support.Cli.RunAsync(service, "step", "dock-loop", "--bind", Demo.Alias,
            "--measurement=-19.2,-19.6,-19.9", "--applied-input=30,30,0", "--disturbance=15", "--timestamp", "2026-12-02T06:00:00Z");
        Assert.True(exit == 0, output);
        Assert.Equal("1", Support.Cli.Line(output, "sequence"));
        Assert.Equal("optimal", Support.Cli.Line(output, "status"));
        Assert.Contains("estimate-initialised", output, StringComparison.Ordinal);
        var move = Support.Cli.Line(output, "first move").Split(", ").Select(v => double.Parse(v, CultureInfo.InvariantCulture)).ToArray();
        Assert.InRange(move[0], 30 - 1e-9, 50 + 1e-9);

        var (next, nextOutput) = await Support.Cli.RunAsync(service, "step", "dock-loop", "--measurement=-19.3,-19.6,-19.9", "--disturbance=15", "--timestamp", "2026-12-02T06:01:00Z");
        Assert.True(next == 0, nextOutput);
        Assert.Equal("2", Support.Cli.Line(nextOutput, "sequence"));
        Assert.Contains("applied-input-assumed", nextOutput, StringComparison.Ordinal);

        var (stale, staleOutput) = await Support.Cli.RunAsync(service, "step", "dock-loop", "--sequence", "0", "--measurement=-19.3,-19.6,-19.9");
        Assert.Equal(1, stale);
        Assert.Contains("refused: 409", staleOutput, StringComparison.Ordinal);
    }

    private static double Number(string text) => double.Parse(text, CultureInfo.InvariantCulture);

    private static string WriteFile(TempFolder folder, string name, string text)
    {
        File.WriteAllText(folder.File(name), text);
        return folder.File(name);
    }
}
