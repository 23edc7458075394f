using Lookahead.Api.Storage;
using Microsoft.Extensions.Diagnostics.HealthChecks;

namespace Lookahead.Api.Hosting;

/// <summary>Ready means the store answers: without it nothing can be registered or recompiled.</summary>
public sealed class StoreHealthCheck(IModelStore store) : IHealthCheck
{
    public async Task<HealthCheckResult> CheckHealthAsync(HealthCheckContext context, CancellationToken cancellationToken = default)
    {
        try
        {
            using var timeout = CancellationTokenSource.CreateLinkedTokenSource(cancellationToken);
            timeout.CancelAfter(TimeSpan.FromSeconds(5));
            await store.PingAsync(timeout.Token);
            return HealthCheckResult.Healthy("store reachable");
        }
        catch (Exception ex)
        {
            return HealthCheckResult.Unhealthy("store unreachable", ex);
        }
    }
}
