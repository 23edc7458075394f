namespace Lookahead.Client.Tests.Support;

/// <summary>A clock that always reads the same instant, to turn an HTTP-date Retry-After into a known wait.</summary>
public sealed class FixedClock(DateTimeOffset now) : TimeProvider
{
    public override DateTimeOffset GetUtcNow() => now;
}
