using System.Diagnostics;
using System.Net;
using System.Net.Sockets;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>Runs the built service as a real process: an acknowledged registration must survive SIGKILL.</summary>
public class DurabilityTests
{
    private static readonly TimeSpan StartTimeout = TimeSpan.FromSeconds(40);

    [Fact]
    public async Task A_registration_acknowledged_with_201_survives_sigkill_and_plans_after_restart()
    {
        Assert.True(File.Exists(Repository.ApiAssembly), $"build the service first: {Repository.ApiAssembly} is missing");
        var folder = Directory.CreateTempSubdirectory("lookahead-durability-").FullName;
        string database = Path.Combine(folder, "lookahead.db");
        try
        {
            string id;
            using (var first = await StartAsync(database))
            {
                using var client = new HttpClient { BaseAddress = first.Address, Timeout = TimeSpan.FromSeconds(20) };
                id = await client.RegisterAsync(TestModels.TwoTanks);

                // No graceful shutdown: the process dies right after the acknowledgement.
                first.Process.Kill();
                await first.Process.WaitForExitAsync();
            }

            using var second = await StartAsync(database);
            using var again = new HttpClient { BaseAddress = second.Address, Timeout = TimeSpan.FromSeconds(20) };
            var plan = await again.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[0.5,-0.2]}""");

            Assert.Equal(HttpStatusCode.OK, plan.StatusCode);
            Assert.Equal(id, (await plan.ReadJsonAsync())["modelId"]!.GetValue<string>());
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }

    private static async Task<RunningService> StartAsync(string database)
    {
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
        var service = new RunningService(process, new Uri($"http://127.0.0.1:{port}"));
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

    private static int FreePort()
    {
        using var listener = new TcpListener(IPAddress.Loopback, 0);
        listener.Start();
        return ((IPEndPoint)listener.LocalEndpoint).Port;
    }

    /// <summary>A started service; disposing kills it if it still runs.</summary>
    private sealed record RunningService(Process Process, Uri Address) : IDisposable
    {
        public void Dispose()
        {
            if (!Process.HasExited)
            {
                Process.Kill(entireProcessTree: true);
                Process.WaitForExit(10_000);
            }

            Process.Dispose();
        }
    }
}
