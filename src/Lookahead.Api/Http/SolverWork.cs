namespace Lookahead.Api.Http;

/// <summary>
/// Endpoint metadata marking a route that runs the solver (plans, replays, simulations, estimates, station steps):
/// such requests count against the client's solver concurrency (RateLimiting:SolverConcurrency).
/// </summary>
public sealed class SolverWork
{
    public static readonly SolverWork Instance = new();

    private SolverWork()
    {
    }
}

/// <summary>How a route says it does solver work.</summary>
public static class SolverWorkConventions
{
    public static TBuilder IsSolverWork<TBuilder>(this TBuilder builder)
        where TBuilder : IEndpointConventionBuilder => builder.WithMetadata(SolverWork.Instance);
}
