using System.Collections.Concurrent;
using System.Diagnostics;
using System.Net;
using System.Net.Sockets;

namespace Lookahead.Api.Tests.Support;

/// <summary>
/// The built service as a real process (`dotnet Lookahead.Api.dll`) on a <see cref="ServiceStore"/>, for tests that
/// kill it without a graceful shutdown and start another on the same store, or stop it with SIGTERM. Disposing kills
/// it if it still runs.
/// </summary>
public sealed class ServiceProcess : IDisposable
{
    /// <summary>
    /// Generous on purpose: a cold start on a loaded 2-core CI machine, with other test classes running beside it,
    /// can be slow. A healthy start returns as soon as the service is ready, so only a broken one waits this long.
    /// </summary>
    public static readonly TimeSpan StartTimeout = TimeSpan.FromSeconds(60);

    private const int OutputLinesKept = 40;

    private readonly Process process;
    private readonly ConcurrentQueue<string> output = new();

    private ServiceProcess(Process process, Uri address)
    {
        this.process = process;
        Address = address;
        process.OutputDataReceived += (_, e) => Keep(e.Data);
        process.ErrorDataReceived += (_, e) => Keep(e.Data);
        process.BeginOutputReadLine();
        process.BeginErrorReadLine();
    }

    public Uri Address { get; }

    /// <summary>Starts the service on the store and returns once /health/ready answers (the store is reachable).</summary>
    /// <param name="settings">Further settings (configuration keys such as "Replay:BatchSize"), passed as environment variables.</param>
    /// <param name="listenHost">The host in --urls (loopback by default; 0.0.0.0 listens on every address, still reached on loopback).</param>
    /// <param name="port">The port to listen on (a free one by default); a replica restarted behind a proxy comes back on its old port.</param>
    public static async Task<ServiceProcess> StartAsync(ServiceStore store, IReadOnlyDictionary<string, string>? settings = null, string listenHost = "127.0.0.1", int? port = null)
    {
        if (!File.Exists(Repository.ApiAssembly))
        {
            throw new FileNotFoundException($"build the service first: {Repository.ApiAssembly} is missing", Repository.ApiAssembly);
        }

        var address = new Uri($"http://127.0.0.1:{port ?? FreePort()}");
        var start = new ProcessStartInfo("dotnet")
        {
            WorkingDirectory = Path.GetDirectoryName(Repository.ApiAssembly)!,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        start.ArgumentList.Add(Repository.ApiAssembly);
        start.ArgumentList.Add("--urls");
        start.ArgumentList.Add($"http://{listenHost}:{address.Port}");
        foreach (var (key, value) in store.Settings.Concat(settings ?? new Dictionary<string, string>()))
        {
            start.Environment[EnvironmentName(key)] = value;
        }

        // No demo unless a test asks for it: most tests want an empty store.
        if (settings?.ContainsKey("Demo:Enabled") != true)
        {
            start.Environment[EnvironmentName("Demo:Enabled")] = "false";
        }

        start.Environment[EnvironmentName("Serilog:MinimumLevel:Default")] = "Warning";
        var service = new ServiceProcess(Process.Start(start) ?? throw new InvalidOperationException("dotnet did not start"), address);
        try
        {
            await service.WaitUntilReadyAsync(store);
            return service;
        }
        catch
        {
            service.Dispose();
            throw;
        }
    }

    public HttpClient CreateClient() => new() { BaseAddress = Address, Timeout = TimeSpan.FromSeconds(20) };

    /// <summary>
    /// SIGKILL: no graceful shutdown, no flush, no disposal of the store; the operating system closes the process's
    /// sockets and files. Returns once the process is gone.
    /// </summary>
    public async Task KillAsync()
    {
        process.Kill();
        await process.WaitForExitAsync();
    }

    /// <summary>
    /// SIGTERM, as systemd, docker and Kubernetes stop a service: the host begins its graceful shutdown. Returns at
    /// once; <see cref="WaitForExitAsync"/> waits for the end.
    /// </summary>
    public void Terminate()
    {
        if (!OperatingSystem.IsLinux() && !OperatingSystem.IsMacOS())
        {
            throw new PlatformNotSupportedException("SIGTERM is sent with kill(1), on Linux or macOS");
        }

        using var kill = Process.Start(new ProcessStartInfo("kill") { ArgumentList = { "-TERM", process.Id.ToString(System.Globalization.CultureInfo.InvariantCulture) }, UseShellExecute = false })
            ?? throw new InvalidOperationException("kill did not start");
        kill.WaitForExit();
        if (kill.ExitCode != 0)
        {
            throw new InvalidOperationException($"kill -TERM {process.Id} exited with code {kill.ExitCode}");
        }
    }

    /// <summary>The exit code, or null when the process still runs after <paramref name="timeout"/>.</summary>
    public async Task<int?> WaitForExitAsync(TimeSpan timeout)
    {
        using var wait = new CancellationTokenSource(timeout);
        try
        {
            await process.WaitForExitAsync(wait.Token);
            return process.ExitCode;
        }
        catch (OperationCanceledException)
        {
            return null;
        }
    }

    /// <summary>The last lines the service wrote, for failure messages.</summary>
    public string OutputTail => string.Join('\n', output);

    public void Dispose()
    {
        if (!process.HasExited)
        {
            process.Kill(entireProcessTree: true);
            process.WaitForExit(10_000);
        }

        process.Dispose();
    }

    // The host reads environment variables prefixed Lookahead__, with __ for the section separator.
    private static string EnvironmentName(string key) => "Lookahead__" + key.Replace(":", "__", StringComparison.Ordinal);

    /// <summary>A loopback port nothing listens on right now.</summary>
    public static int FreePort()
    {
        using var listener = new TcpListener(IPAddress.Loopback, 0);
        listener.Start();
        return ((IPEndPoint)listener.LocalEndpoint).Port;
    }

    private async Task WaitUntilReadyAsync(ServiceStore store)
    {
        using var probe = new HttpClient { BaseAddress = Address, Timeout = TimeSpan.FromSeconds(2) };
        var deadline = DateTime.UtcNow + StartTimeout;
        while (DateTime.UtcNow < deadline && !process.HasExited)
        {
            try
            {
                if ((await probe.GetAsync("/health/ready")).IsSuccessStatusCode)
                {
                    return;
                }
            }
            catch (HttpRequestException)
            {
            }
            catch (TaskCanceledException)
            {
            }

            await Task.Delay(100);
        }

        if (process.HasExited)
        {
            // Lets the output readers reach the end, so the message carries the reason it gave.
            await process.WaitForExitAsync();
        }

        string tail = string.Join('\n', output);
        throw process.HasExited
            ? new InvalidOperationException($"the service on {store.Description} exited with code {process.ExitCode}; its last output:\n{tail}")
            : new TimeoutException($"the service on {store.Description} was not ready within {StartTimeout.TotalSeconds} s; its last output:\n{tail}");
    }

    private void Keep(string? line)
    {
        if (line is null)
        {
            return;
        }

        output.Enqueue(line);
        while (output.Count > OutputLinesKept && output.TryDequeue(out _))
        {
        }
    }
}
