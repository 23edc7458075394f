using System.Diagnostics;
using System.Globalization;
using System.Text;

namespace Lookahead.Api.Tests.Support;

/// <summary>
/// A real nginx process in front of service replicas on loopback, with its own configuration, prefix, pid file and
/// access log in a temp folder, run in the foreground (never the system's nginx service). The configuration follows
/// deploy/nginx/nginx.conf, with fixed loopback upstreams instead of the container name. Disposing stops it and removes
/// the folder.
/// </summary>
public sealed class NginxProxy : IDisposable
{
    /// <summary>Overrides where nginx is looked for (otherwise /usr/sbin/nginx, then PATH).</summary>
    public const string ExecutableVariable = "LOOKAHEAD_TEST_NGINX";

    private readonly Process process;
    private readonly string folder;

    private NginxProxy(Process process, string folder, Uri address)
    {
        this.process = process;
        this.folder = folder;
        Address = address;
    }

    public Uri Address { get; }

    /// <summary>The nginx executable, or null when it is not installed.</summary>
    public static string? Executable { get; } = Find();

    /// <summary>Why tests needing nginx are skipped, or null when it is installed.</summary>
    public static string? MissingReason => Executable is null
        ? $"nginx is not installed (Debian package nginx; .ci/run installs it in CI, or set {ExecutableVariable})"
        : null;

    public static async Task<NginxProxy> StartAsync(IEnumerable<Uri> replicas)
    {
        string executable = Executable ?? throw new InvalidOperationException(MissingReason);
        string folder = Directory.CreateTempSubdirectory("lookahead-nginx-").FullName;

        // When the tests run as root, nginx's workers run as nobody and must reach the temp paths inside.
        if (!OperatingSystem.IsWindows())
        {
            File.SetUnixFileMode(folder, (UnixFileMode)Convert.ToInt32("755", 8));
        }

        var address = new Uri($"http://127.0.0.1:{ServiceProcess.FreePort()}");
        File.WriteAllText(Path.Combine(folder, "nginx.conf"), Configuration(folder, address.Port, replicas));

        var start = new ProcessStartInfo(executable)
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        foreach (string argument in new[] { "-p", folder + "/", "-c", Path.Combine(folder, "nginx.conf"), "-g", "daemon off;" })
        {
            start.ArgumentList.Add(argument);
        }

        var nginx = new NginxProxy(Process.Start(start) ?? throw new InvalidOperationException("nginx did not start"), folder, address);
        try
        {
            await nginx.WaitUntilListeningAsync();
            return nginx;
        }
        catch
        {
            nginx.Dispose();
            throw;
        }
    }

    public HttpClient CreateClient() => new() { BaseAddress = Address, Timeout = TimeSpan.FromSeconds(20) };

    /// <summary>The access log so far, one entry per request: status, the upstreams tried in order and their statuses.</summary>
    public IReadOnlyList<ProxiedRequest> ReadAccessLog()
    {
        string path = Path.Combine(folder, "access.log");
        if (!File.Exists(path))
        {
            return [];
        }

        using var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite);
        using var reader = new StreamReader(stream, Encoding.UTF8);
        return reader.ReadToEnd()
            .Split('\n', StringSplitOptions.RemoveEmptyEntries)
            .Select(ProxiedRequest.Parse)
            .ToList();
    }

    public string ErrorLog
    {
        get
        {
            string path = Path.Combine(folder, "error.log");
            return File.Exists(path) ? File.ReadAllText(path) : "";
        }
    }

    public void Dispose()
    {
        if (!process.HasExited)
        {
            // SIGTERM is nginx's fast shutdown: the master stops its workers and exits. Killing only the master
            // would leave the workers holding the port.
            using (var kill = Process.Start(new ProcessStartInfo("kill") { ArgumentList = { "-TERM", process.Id.ToString(CultureInfo.InvariantCulture) }, UseShellExecute = false }))
            {
                kill?.WaitForExit();
            }

            if (!process.WaitForExit(10_000))
            {
                process.Kill(entireProcessTree: true);
                process.WaitForExit(10_000);
            }
        }

        process.Dispose();
        try
        {
            Directory.Delete(folder, recursive: true);
        }
        catch (IOException)
        {
            // Temp paths nginx's workers created as another user may resist; the temp folder is cleaned anyway.
        }
        catch (UnauthorizedAccessException)
        {
        }
    }

    private static string Configuration(string folder, int port, IEnumerable<Uri> replicas)
    {
        string servers = string.Join("\n", replicas.Select(r => $"        server 127.0.0.1:{r.Port};"));
        return $$"""
            worker_processes 1;
            pid {{folder}}/nginx.pid;
            error_log {{folder}}/error.log warn;

            events {
                worker_connections 1024;
            }

            http {
                client_body_temp_path {{folder}}/client_body;
                proxy_temp_path {{folder}}/proxy;
                fastcgi_temp_path {{folder}}/fastcgi;
                uwsgi_temp_path {{folder}}/uwsgi;
                scgi_temp_path {{folder}}/scgi;

                upstream lookahead {
            {{servers}}
                    keepalive 64;
                }

                client_max_body_size 2m;

                # status | upstreams tried, in order | their statuses | request: a retried request names two upstreams.
                log_format replicas '$status|$upstream_addr|$upstream_status|$request_method $request_uri|$http_plan_number';
                access_log {{folder}}/access.log replicas;

                server {
                    listen 127.0.0.1:{{port}};

                    proxy_http_version 1.1;
                    proxy_set_header Connection "";
                    proxy_set_header Host $host;
                    proxy_set_header X-Forwarded-For $proxy_add_x_forwarded_for;
                    proxy_set_header X-Forwarded-Proto $scheme;
                    proxy_connect_timeout 2s;
                    proxy_read_timeout 60s;
                    # As deploy/nginx/nginx.conf: POSTs are retried on another replica too (non_idempotent), because
                    # plans are pure, registration is idempotent by content hash and a station step is guarded by its
                    # sequence (a repeated step is answered from the store).
                    proxy_next_upstream error timeout http_502 http_503 non_idempotent;

                    location / {
                        proxy_pass http://lookahead;
                    }

                    location ~ ^/v1/models/[^/]+/plans$ {
                        client_max_body_size 0;
                        proxy_request_buffering off;
                        proxy_buffering off;
                        proxy_read_timeout 3600s;
                        proxy_send_timeout 3600s;
                        proxy_next_upstream off;
                        proxy_pass http://lookahead;
                    }
                }
            }
            """;
    }

    private static string? Find()
    {
        if (Environment.GetEnvironmentVariable(ExecutableVariable) is { Length: > 0 } configured)
        {
            return File.Exists(configured) ? configured : null;
        }

        var candidates = new[] { "/usr/sbin/nginx" }
            .Concat((Environment.GetEnvironmentVariable("PATH") ?? "").Split(':', StringSplitOptions.RemoveEmptyEntries).Select(p => Path.Combine(p, "nginx")));
        return candidates.FirstOrDefault(File.Exists);
    }

    private async Task WaitUntilListeningAsync()
    {
        using var probe = new HttpClient { BaseAddress = Address, Timeout = TimeSpan.FromSeconds(2) };
        var deadline = DateTime.UtcNow + TimeSpan.FromSeconds(20);
        while (DateTime.UtcNow < deadline && !process.HasExited)
        {
            try
            {
                if ((await probe.GetAsync("/health/live")).IsSuccessStatusCode)
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

            await Task.Delay(50);
        }

        string output = process.HasExited ? await process.StandardError.ReadToEndAsync() : "";
        throw new TimeoutException($"nginx did not answer on {Address} within 20 s: {output} {ErrorLog}");
    }
}
