using System.Diagnostics;
using System.Net;
using System.Net.Sockets;
using Xunit;

namespace Lookahead.Api.Tests.Support;

/// <summary>
/// A PostgreSQL server of the test's own, on a free port and in a temp folder, that the test may stop and start
/// without disturbing the shared test server. Run as the postgres user when the tests run as root (as tests/postgres.sh does).
/// </summary>
public sealed class ThrowawayPostgres : IAsyncDisposable
{
    private static readonly string Bin = Environment.GetEnvironmentVariable("PG_BIN") ?? "/usr/lib/postgresql/15/bin";
    private readonly string folder;
    private readonly int port;

    private ThrowawayPostgres(string folder, int port)
    {
        this.folder = folder;
        this.port = port;
    }

    /// <summary>Null when initdb and pg_ctl are at hand; otherwise why a test needing them is skipped.</summary>
    public static string? MissingReason =>
        File.Exists(Path.Combine(Bin, "initdb")) && File.Exists(Path.Combine(Bin, "pg_ctl"))
            ? null
            : $"PostgreSQL server binaries not found in {Bin} (set PG_BIN or install postgresql): this test stops and starts a server of its own";

    public string ConnectionString => $"Host=127.0.0.1;Port={port};Username=postgres;Database=postgres;Pooling=true;Timeout=5";

    private static bool AsRoot => Environment.UserName == "root";

    public static async Task<ThrowawayPostgres> StartAsync()
    {
        var folder = Directory.CreateTempSubdirectory("lookahead-pg-outage-").FullName;
        if (AsRoot)
        {
            await RunAsync("chown", ["postgres", folder], asPostgres: false);
        }

        var server = new ThrowawayPostgres(folder, FreePort());
        await RunAsync(Path.Combine(Bin, "initdb"), ["-D", server.DataFolder, "-U", "postgres", "-A", "trust"], asPostgres: true);
        await server.StartAgainAsync();
        return server;
    }

    private string DataFolder => Path.Combine(folder, "data");

    public Task StartAgainAsync() => RunAsync(
        Path.Combine(Bin, "pg_ctl"),
        ["-D", DataFolder, "-l", Path.Combine(folder, "log"), "-w", "-o", $"-c listen_addresses=127.0.0.1 -p {port} -k {folder} -c fsync=off", "start"],
        asPostgres: true);

    public Task StopAsync() => RunAsync(Path.Combine(Bin, "pg_ctl"), ["-D", DataFolder, "-m", "fast", "-w", "stop"], asPostgres: true);

    public async ValueTask DisposeAsync()
    {
        try
        {
            await StopAsync();
        }
        catch (InvalidOperationException)
        {
            // Already stopped by the test.
        }

        Directory.Delete(folder, recursive: true);
    }

    private static int FreePort()
    {
        using var listener = new TcpListener(IPAddress.Loopback, 0);
        listener.Start();
        return ((IPEndPoint)listener.LocalEndpoint).Port;
    }

    private static async Task RunAsync(string program, string[] arguments, bool asPostgres)
    {
        var start = new ProcessStartInfo { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        if (asPostgres && AsRoot)
        {
            start.FileName = "runuser";
            foreach (var a in new[] { "-u", "postgres", "--", program })
            {
                start.ArgumentList.Add(a);
            }
        }
        else
        {
            start.FileName = program;
        }

        foreach (var a in arguments)
        {
            start.ArgumentList.Add(a);
        }

        using var process = Process.Start(start) ?? throw new InvalidOperationException($"could not start {program}");
        var output = process.StandardOutput.ReadToEndAsync();
        var error = process.StandardError.ReadToEndAsync();
        using var timeout = new CancellationTokenSource(TimeSpan.FromSeconds(60));
        await process.WaitForExitAsync(timeout.Token);
        if (process.ExitCode != 0)
        {
            throw new InvalidOperationException($"{program} {string.Join(' ', arguments)} exited {process.ExitCode}: {await output} {await error}");
        }
    }
}

/// <summary>A fact skipped, saying why, when the PostgreSQL server binaries are not installed.</summary>
[AttributeUsage(AttributeTargets.Method)]
public sealed class PostgresServerFactAttribute : FactAttribute
{
    public PostgresServerFactAttribute()
    {
        if (ThrowawayPostgres.MissingReason is { } reason)
        {
            Skip = reason;
        }
    }
}
