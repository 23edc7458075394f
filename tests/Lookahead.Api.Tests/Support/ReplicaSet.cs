namespace Lookahead.Api.Tests.Support;

/// <summary>
/// Three service processes on one PostgreSQL schema, behind one nginx. The replicas remember an alias resolution for
/// <see cref="AliasSeconds"/> and believe X-Forwarded-For from loopback (where nginx is). Disposing stops them all and
/// drops the schema.
/// </summary>
public sealed class ReplicaSet : IAsyncDisposable
{
    public const int AliasSeconds = 1;

    private readonly ServiceStore store;
    private readonly ServiceProcess[] replicas;

    private ReplicaSet(ServiceStore store, ServiceProcess[] replicas, NginxProxy proxy)
    {
        this.store = store;
        this.replicas = replicas;
        Proxy = proxy;
    }

    public NginxProxy Proxy { get; }

    public IReadOnlyList<ServiceProcess> Replicas => replicas;

    public static async Task<ReplicaSet> StartAsync()
    {
        var store = ServiceStore.Postgres();
        var starting = Enumerable.Range(0, 3).Select(_ => ServiceProcess.StartAsync(store, Settings)).ToList();
        try
        {
            var replicas = await Task.WhenAll(starting);
            var proxy = await NginxProxy.StartAsync(replicas.Select(r => r.Address));
            return new ReplicaSet(store, replicas, proxy);
        }
        catch
        {
            foreach (var started in starting.Where(t => t.IsCompletedSuccessfully))
            {
                started.Result.Dispose();
            }

            await store.DisposeAsync();
            throw;
        }
    }

    /// <summary>SIGTERM to one replica, wait for its graceful end, then start it again on the same port; returns how long each half took.</summary>
    public async Task<(TimeSpan Stopping, TimeSpan Starting)> RestartGracefullyAsync(int index)
    {
        var watch = System.Diagnostics.Stopwatch.StartNew();
        var old = replicas[index];
        old.Terminate();
        var exit = await old.WaitForExitAsync(TimeSpan.FromSeconds(30));
        if (exit is null)
        {
            throw new TimeoutException($"replica {index} did not end within 30 s of SIGTERM:\n{old.OutputTail}");
        }

        old.Dispose();
        var stopping = watch.Elapsed;
        replicas[index] = await ServiceProcess.StartAsync(store, Settings, port: old.Address.Port);
        return (stopping, watch.Elapsed - stopping);
    }

    public async ValueTask DisposeAsync()
    {
        Proxy.Dispose();
        foreach (var replica in replicas)
        {
            replica.Dispose();
        }

        await store.DisposeAsync();
    }

    private static Dictionary<string, string> Settings => new()
    {
        ["Cache:AliasSeconds"] = AliasSeconds.ToString(System.Globalization.CultureInfo.InvariantCulture),
        ["Cache:ModelSeconds"] = AliasSeconds.ToString(System.Globalization.CultureInfo.InvariantCulture),
        ["Proxies:Addresses:0"] = "127.0.0.1",
    };
}
