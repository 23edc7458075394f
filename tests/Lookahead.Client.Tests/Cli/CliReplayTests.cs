using System.Globalization;
using System.Text;
using Lookahead.Cli.Replay;
using Lookahead.Client.Tests.Support;
using Xunit;

namespace Lookahead.Client.Tests.Cli;

/// <summary>
/// The tool's replay of historian exports: dialects sniffed or given, tags mapped to labels, answers written in the
/// input's dialect and equal to single plans, error rows counted, progress lines, and resumed output that ends up
/// what one uninterrupted run writes (to the rounding of a cold start where the run was warm).
/// </summary>
public class CliReplayTests
{
    private static readonly CultureInfo Comma = CultureInfo.GetCultureInfo("de-DE");

    /// <summary>A historian's export in its own words: tag names, semicolons, decimal commas, a free-text column.</summary>
    private static string SemicolonExport(int rows, int badRow = -1)
    {
        var text = new StringBuilder("Zeit;TI-101.PV;TI-102.PV;TI-103.PV;FC-1.OUT;FC-2.OUT;FAN.OUT;Kommentar\n");
        for (int i = 1; i <= rows; i++)
        {
            var x = HistorianRows.State(i);
            var u = HistorianRows.PreviousInput(i);
            string first = i == badRow ? "kaputt" : x[0].ToString("0.###", Comma);
            text.Append(CultureInfo.InvariantCulture, $"2026-12-01T{6 + (i / 60):00}:{i % 60:00}:00Z;{first};{x[1].ToString("0.###", Comma)};{x[2].ToString("0.###", Comma)};")
                .Append(CultureInfo.InvariantCulture, $"{u[0].ToString("0.##", Comma)};{u[1].ToString("0.##", Comma)};{u[2].ToString("0.##", Comma)};Schicht {i % 3}, ok\n");
        }

        return text.ToString();
    }

    private static async Task<string> MappingFileAsync(TempFolder folder)
    {
        string path = folder.File("tags.txt");
        await File.WriteAllTextAsync(path, """
            # historian tag = model column
            TI-101.PV=zone_a_temp
            TI-102.PV=zone_b_temp
            TI-103.PV=zone_c_temp
            FC-1.OUT=prev_chiller_1
            FC-2.OUT=prev_chiller_2
            """);
        return path;
    }

    [Fact]
    public void Semicolons_and_decimal_commas_are_sniffed_and_plain_csv_is_left_alone()
    {
        Assert.Equal(new CsvDialect(';', true), DialectSniffer.Sniff(["t;a;b", "x;-17,5;30", "y;-17,25;31,5"]));
        Assert.Equal(new CsvDialect(';', false), DialectSniffer.Sniff(["t;a;b", "x;-17.5;30", "y;-17.25;31.5"]));
        Assert.Equal(new CsvDialect('\t', true), DialectSniffer.Sniff(["t\ta\tb", "x\t-17,5\t30"]));
        Assert.Equal(CsvDialect.Standard, DialectSniffer.Sniff(["t,a,b", "x,-17.5,30", "\"y, late\",-17.25,31.5"]));
        Assert.Equal(new CsvDialect('|', false), DialectSniffer.Sniff(["t|a|b", "x|1|2"]));
    }

    [Fact]
    public async Task A_semicolon_export_with_decimal_commas_and_mapped_tags_replays_into_its_own_dialect()
    {
        await using var service = new ServiceFactory();
        using var folder = new TempFolder();
        using var client = service.CreateLookaheadClient();
        string input = folder.File("export.csv");
        await File.WriteAllTextAsync(input, SemicolonExport(40, badRow: 7));
        string map = await MappingFileAsync(folder);
        string output = folder.File("moves.csv");

        var (exit, said) = await Support.Cli.RunAsync(service, "replay", Demo.Alias, input, "--out", output, "--map-file", map, "--map", "FAN.OUT=prev_door_fan");
        Assert.True(exit == 0, said);
        Assert.Contains("dialect: delimiter ';', decimal comma", said, StringComparison.Ordinal);
        Assert.Contains("replayed 40 rows (1 errors)", said, StringComparison.Ordinal);

        var lines = await File.ReadAllLinesAsync(output);
        Assert.Equal("Zeit;Kommentar;chiller_1;chiller_2;door_fan;cost;status;message", lines[0]);
        Assert.Equal(42, lines.Length);
        Assert.StartsWith("#summary;rows=40;failedRows=1;complete=true", lines[^1], StringComparison.Ordinal);

        var demo = await Demo.IdAsync(client);
        foreach (int row in new[] { 1, 2, 39, 40 })
        {
            var fields = lines[row].Split(';');
            Assert.Equal("Schicht " + (row % 3) + ", ok", fields[1]);
            Assert.Equal("optimal", fields[6]);

            // The historian rounded its values; the service planned exactly what the file said.
            var x = HistorianRows.State(row).Select(v => Math.Round(v, 3)).ToArray();
            var u = HistorianRows.PreviousInput(row).Select(v => Math.Round(v, 2)).ToArray();
            u[2] = Math.Round(u[2], 2);
            var plan = await client.PlanAsync(demo, new PlanRequest { State = x, PreviousInput = u });
            for (int j = 0; j < 3; j++)
            {
                Assert.DoesNotContain(".", fields[2 + j], StringComparison.Ordinal);
                Assert.Equal(plan.FirstMove[j], double.Parse(fields[2 + j], Comma), 6);
            }
        }

        var bad = lines[7].Split(';');
        Assert.Equal("error", bad[6]);
        Assert.Contains("zone_a_temp", bad[7], StringComparison.Ordinal);
    }

    [Fact]
    public async Task A_tab_export_with_the_dialect_given_replays_with_a_decimal_point()
    {
        await using var service = new ServiceFactory();
        using var folder = new TempFolder();
        string input = folder.File("export.tsv");
        await File.WriteAllTextAsync(input, "time\tzone_a_temp\tzone_b_temp\tzone_c_temp\n06:00\t-17.5\t-18.5\t-19.5\n06:01\t-17.7\t-18.6\t-19.5\n");
        string output = folder.File("moves.tsv");

        var (exit, said) = await Support.Cli.RunAsync(service, "replay", Demo.Alias, input, "-o", output, "--delimiter", "tab", "--decimal-point");
        Assert.True(exit == 0, said);
        var lines = await File.ReadAllLinesAsync(output);
        Assert.Equal("time\tchiller_1\tchiller_2\tdoor_fan\tcost\tstatus\tmessage", lines[0]);
        Assert.Equal("06:01", lines[2].Split('\t')[0]);
        Assert.Equal("optimal", lines[2].Split('\t')[5]);
    }

    [Fact]
    public async Task Resume_after_a_killed_run_or_a_stopped_service_writes_what_one_run_writes()
    {
        await using var service = new ServiceFactory();
        using var folder = new TempFolder();
        string input = folder.File("export.csv");
        await File.WriteAllTextAsync(input, SemicolonExport(300, badRow: 250));
        string map = await MappingFileAsync(folder);
        string[] mapping = ["--map-file", map, "--map", "FAN.OUT=prev_door_fan"];

        string whole = folder.File("whole.csv");
        var (exit, said) = await Support.Cli.RunAsync(service, ["replay", Demo.Alias, input, "--out", whole, .. mapping]);
        Assert.True(exit == 0, said);
        byte[] expected = await File.ReadAllBytesAsync(whole);
        var lines = (await File.ReadAllTextAsync(whole)).Split('\n');

        // A process killed mid-write: 120 rows, then half of the next line.
        string killed = folder.File("killed.csv");
        await File.WriteAllTextAsync(killed, string.Join('\n', lines[..121]) + "\n" + lines[121][..(lines[121].Length / 2)]);
        var (resumed, resumedSaid) = await Support.Cli.RunAsync(service, ["replay", Demo.Alias, input, "--out", killed, "--resume", .. mapping]);
        Assert.True(resumed == 0, resumedSaid);
        Assert.Contains("resuming: 120 rows already in", resumedSaid, StringComparison.Ordinal);
        Assert.Contains("replayed 180 rows (1 errors)", resumedSaid, StringComparison.Ordinal);
        SameRun(expected, await File.ReadAllBytesAsync(killed));

        // A service that stopped: 260 rows (the bad one among them) and its incomplete summary.
        string stopped = folder.File("stopped.csv");
        await File.WriteAllTextAsync(stopped, string.Join('\n', lines[..261]) + "\n#summary;rows=260;failedRows=1;complete=false;;;;\n");
        var (again, againSaid) = await Support.Cli.RunAsync(service, ["replay", Demo.Alias, input, "--out", stopped, "--resume", .. mapping]);
        Assert.True(again == 0, againSaid);
        Assert.Contains("resuming: 260 rows already in", againSaid, StringComparison.Ordinal);
        SameRun(expected, await File.ReadAllBytesAsync(stopped));

        // Without --resume an existing output is left alone.
        byte[] before = await File.ReadAllBytesAsync(stopped);
        var (refused, refusedSaid) = await Support.Cli.RunAsync(service, ["replay", Demo.Alias, input, "--out", stopped, .. mapping]);
        Assert.Equal(2, refused);
        Assert.Contains("--resume", refusedSaid, StringComparison.Ordinal);
        Assert.Equal(before, await File.ReadAllBytesAsync(stopped));
    }

    /// <summary>
    /// The same file but for rounding: a resumed run plans its first row cold where the whole run started it from the
    /// row before (a warm start reaches the same optimum to rounding), so numbers may differ in their last digits.
    /// Everything else — rows, order, columns, text, statuses, messages, the summary — is identical.
    /// </summary>
    private static void SameRun(byte[] expected, byte[] actual)
    {
        var want = Encoding.UTF8.GetString(expected).Split('\n');
        var got = Encoding.UTF8.GetString(actual).Split('\n');
        Assert.Equal(want.Length, got.Length);
        for (int i = 0; i < want.Length; i++)
        {
            var a = want[i].Split(';');
            var b = got[i].Split(';');
            Assert.Equal(a.Length, b.Length);
            for (int j = 0; j < a.Length; j++)
            {
                if (double.TryParse(a[j], NumberStyles.Float, Comma, out double x) && double.TryParse(b[j], NumberStyles.Float, Comma, out double y))
                {
                    Assert.True(Math.Abs(x - y) <= 1e-9 * Math.Max(1, Math.Abs(x)), $"line {i} field {j}: {a[j]} vs {b[j]}");
                }
                else
                {
                    Assert.Equal(a[j], b[j]);
                }
            }
        }
    }

    [Fact]
    public async Task A_header_the_service_refuses_exits_1_with_the_reason_and_the_upload_does_not_hang()
    {
        await using var service = new ServiceFactory();
        using var folder = new TempFolder();
        string input = folder.File("export.csv");

        // Enough rows that the upload would fill the pipe if nothing stopped it.
        await File.WriteAllTextAsync(input, "time,TI-101.PV\n" + string.Concat(Enumerable.Range(0, 50_000).Select(i => $"{i},-17.5\n")));

        var (exit, said) = await Support.Cli.RunAsync(service, "replay", Demo.Alias, input, "--out", folder.File("moves.csv"), "--map", "TI-101.PV=zone_a_temp", "--map", "TI-999=zone_b_temp");
        Assert.Equal(1, exit);
        Assert.Contains("refused: 400", said, StringComparison.Ordinal);
        Assert.Contains("the input has no column 'TI-999' to map", said, StringComparison.Ordinal);
    }

    [Fact]
    public async Task A_long_replay_reports_progress_lines_with_rate_errors_and_time_left()
    {
        await using var service = new ServiceFactory();
        using var folder = new TempFolder();
        string input = folder.File("export.csv");
        var text = new StringBuilder("timestamp,zone_a_temp,zone_b_temp,zone_c_temp,prev_chiller_1,prev_chiller_2,prev_door_fan,v_outdoor\n");
        for (int i = 1; i <= 20_000; i++)
        {
            var x = HistorianRows.State(i);
            var u = HistorianRows.PreviousInput(i);
            text.Append(CultureInfo.InvariantCulture, $"{i},{x[0]:R},{x[1]:R},{x[2]:R},{u[0]:R},{u[1]:R},{u[2]:R},{HistorianRows.Outdoor(i):R}\n");
        }

        await File.WriteAllTextAsync(input, text.ToString());
        string output = folder.File("moves.csv");

        var (exit, said) = await Support.Cli.RunAsync(service, "replay", Demo.Alias, input, "--out", output);
        Assert.True(exit == 0, said);
        Assert.Contains("dialect: delimiter ',', decimal point", said, StringComparison.Ordinal);
        Assert.Matches(@"rows 10,000 \(\d+ %\) · [\d,]+ rows/s · 0 errors · about [\d:]+ left", said);
        Assert.Contains("replayed 20,000 rows (0 errors)", said, StringComparison.Ordinal);
        var lines = await File.ReadAllLinesAsync(output);
        Assert.Equal(20_002, lines.Length);
        Assert.StartsWith("#summary,rows=20000,failedRows=0,complete=true", lines[^1], StringComparison.Ordinal);
    }
}
