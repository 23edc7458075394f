using System.ComponentModel.DataAnnotations;

namespace Lookahead.Api.Stations;

/// <summary>Stations ("Stations" section): how much history each keeps and how long a gap it bridges.</summary>
public sealed class StationOptions
{
    public const string Section = "Stations";

    /// <summary>Steps kept per station for GET …/steps (the oldest go as new ones land); 0 keeps none.</summary>
    [Range(0, 100_000)]
    public int HistoryLength { get; set; } = 1000;

    /// <summary>
    /// Missed samples a step propagates the estimate through; a longer gap starts the estimate over from the
    /// measurement, since an open-loop prediction that long says more about the model than about the plant.
    /// </summary>
    [Range(1, 10_000)]
    public int MaxMissedSamples { get; set; } = 30;
}
