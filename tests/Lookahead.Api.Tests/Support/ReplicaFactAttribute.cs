using Xunit;

namespace Lookahead.Api.Tests.Support;

/// <summary>A fact skipped, saying why, without a PostgreSQL server (tests/run.sh starts one) or without nginx (.ci/run installs it).</summary>
[AttributeUsage(AttributeTargets.Method)]
public sealed class ReplicaFactAttribute : FactAttribute
{
    public ReplicaFactAttribute()
    {
        if (string.IsNullOrWhiteSpace(Environment.GetEnvironmentVariable(ServiceStore.PostgresVariable)))
        {
            Skip = $"{ServiceStore.PostgresVariable} is not set: replicas share a PostgreSQL store; tests/run.sh starts one and sets this Npgsql connection string";
        }
        else if (NginxProxy.MissingReason is { } reason)
        {
            Skip = reason;
        }
    }
}
