using System.Collections.Concurrent;

namespace Lookahead.Api.Stations;

/// <summary>
/// One gate per station (tenant and name), so the steps of a station run one at a time inside this instance (the store's
/// sequence guard decides between instances). A gate lives as long as the process; there is one per station name
/// ever stepped here, which is as many as the plant has.
/// </summary>
public sealed class StationLocks
{
    private readonly ConcurrentDictionary<(string Tenant, string Name), SemaphoreSlim> gates = new();

    public SemaphoreSlim For(string tenant, string name) => gates.GetOrAdd((tenant, name), _ => new SemaphoreSlim(1, 1));
}
