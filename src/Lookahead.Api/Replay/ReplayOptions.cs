using System.ComponentModel.DataAnnotations;

namespace Lookahead.Api.Replay;

/// <summary>Replay batching ("Replay" section): rows are read, planned in parallel and written in batches.</summary>
public sealed class ReplayOptions
{
    public const string Section = "Replay";

    [Range(1, 65_536)]
    public int BatchSize { get; set; } = 1024;

    /// <summary>0 means one worker per processor.</summary>
    [Range(0, 1024)]
    public int MaxDegreeOfParallelism { get; set; }
}
