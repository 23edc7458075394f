using System.Diagnostics;
using System.Net;
using System.Net.Sockets;
using Xunit;

namespace Lookahead.Api.Tests.Support;

/// <summary>The built service as a real process on a free port (Kestrel, not the in-memory host); disposing kills it if it still runs.</summary>
public sealed class ServiceProcess : IDisposable
{
    private static readonly TimeSpan StartTimeout = TimeSpan.FromSeconds(40);

    private ServiceProcess(Process process, Uri address)
    {
        Process = process;
        Address = address;
    }

    public Process Process { get; }

    public Uri Address { get; }

    /// <summary>Starts the service on <paramref name="database"/> (demo seeding off) and waits until it is ready.</summary>
    public static async Task<ServiceProcess> StartAsync(string database)
    {
        Assert.True(File.Exists(Repository.ApiAssembly), $"build the service first: {Repository.ApiAssembly} is missing");
        int port = FreePort();
        var start = new ProcessStartInfo("dotnet")
        {
            WorkingDirectory = Path.GetDirectoryName(Repository.ApiAssembly)!,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        start.ArgumentList.Add(Repository.ApiAssembly);
        start.ArgumentList.Add("--urls");
        start.ArgumentList.Add($"http://127.0.0.1:{port}");
        start.Environment["Lookahead__Store__SqlitePath"] = database;
        start.Environment["Lookahead__Demo__Enabled"] = "false";
        start.Environment["Lookahead__Serilog__MinimumLevel__Default"] = "Warning";
        var process = Process.Start(start) ?? throw new InvalidOperationException("dotnet did not start");
        process.OutputDataReceived += (_, _) => { };
        process.ErrorDataReceived += (_, _) => { };
        process.BeginOutputReadLine();
        process.BeginErrorReadLine();
        var service = new ServiceProcess(process, new Uri($"http://127.0.0.1:{port}"));
        using var probe = new HttpClient { BaseAddress = service.Address, Timeout = TimeSpan.FromSeconds(2) };
        var deadline = DateTime.UtcNow + StartTimeout;
        while (DateTime.UtcNow < deadline && !process.HasExited)
        {
            try
            {
                if ((await probe.GetAsync("/health/ready")).IsSuccessStatusCode)
                {
                    return service;
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

        service.Dispose();
        throw new TimeoutException($"the service did not become ready within {StartTimeout.TotalSeconds} s");
    }

    public void Dispose()
    {
        if (!Process.HasExited)
        {
            Process.Kill(entireProcessTree: true);
            Process.WaitForExit(10_000);
        }

        Process.Dispose();
    }

    private static int FreePort()
    {
        using var listener = new TcpListener(IPAddress.Loopback, 0);
        listener.Start();
        return ((IPEndPoint)listener.LocalEndpoint).Port;
    }
}
