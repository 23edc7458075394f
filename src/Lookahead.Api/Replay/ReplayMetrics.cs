using Prometheus;

namespace Lookahead.Api.Replay;

/// <summary>Replay rows by format and outcome, in the application's own registry.</summary>
public sealed class ReplayMetrics(CollectorRegistry registry)
{
    public Counter Rows { get; } = Metrics.WithCustomRegistry(registry)
        .CreateCounter("lookahead_replay_rows_total", "Replay rows processed, by format and outcome.", "format", "outcome");
}
