using Prometheus;

namespace Lookahead.Api.Stations;

/// <summary>Station steps, their latency, sequence conflicts and estimates started over, in the application's registry.</summary>
public sealed class StationMetrics
{
    public StationMetrics(CollectorRegistry registry)
    {
        var factory = Metrics.WithCustomRegistry(registry);
        Steps = factory.CreateCounter(
            "lookahead_station_steps_total", "Station steps applied, by mode (auto, track) and plan status (tracking in track mode).", "mode", "status");
        Duration = factory.CreateHistogram(
            "lookahead_station_step_duration_seconds",
            "Time from reading a step's body to its durable commit (estimate, plan and store).",
            new HistogramConfiguration { Buckets = Histogram.ExponentialBuckets(0.000_05, 2, 16) });
        Conflicts = factory.CreateCounter("lookahead_station_conflicts_total", "Steps refused with 409: their sequence was not the station's.");
        Retries = factory.CreateCounter("lookahead_station_retries_total", "Identical retries of the last applied step, answered from the store.");
        Restarts = factory.CreateCounter(
            "lookahead_station_restarts_total", "Estimates started over at a step, by reason (gap: too many missed samples; model: the alias named a model of other dimensions).", "reason");
    }

    public Counter Steps { get; }

    public Histogram Duration { get; }

    public Counter Conflicts { get; }

    public Counter Retries { get; }

    public Counter Restarts { get; }
}
