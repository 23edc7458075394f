using Lookahead.Api.Storage;
using Microsoft.Extensions.Diagnostics.HealthChecks;

namespace Lookahead.Api.Hosting;

/// <summary>
/// Ready means the store answers: without it nothing can be registered or recompiled. Probes come every few seconds
/// through an outage, so the cause is logged once when the store becomes unreachable (and once when it is back),
/// not with a stack trace per probe; the probe's answer carries only the kind of failure.
/// </summary>
public sealed class StoreHealthCheck(IModelStore store, ILogger<StoreHealthCheck> logger) : IHealthCheck
{
    private int unreachable;

    public async Task<HealthCheckResult> CheckHealthAsync(HealthCheckContext context, CancellationToken cancellationToken = default)
    {
        try
        {
            using var timeout = CancellationTokenSource.CreateLinkedTokenSource(cancellationToken);
            timeout.CancelAfter(TimeSpan.FromSeconds(5));
            await store.PingAsync(timeout.Token);
            if (Interlocked.Exchange(ref unreachable, 0) == 1)
            {
                logger.LogInformation("Store reachable again; ready");
            }

            return HealthCheckResult.Healthy("store reachable");
        }
        catch (Exception ex) when (ex is not OperationCanceledException || !cancellationToken.IsCancellationRequested)
        {
            if (Interlocked.Exchange(ref unreachable, 1) == 0)
            {
                logger.LogWarning(ex, "Store unreachable; not ready until it answers again");
            }

            return HealthCheckResult.Unhealthy($"store unreachable ({(ex.InnerException ?? ex).GetType().Name})");
        }
    }
}
