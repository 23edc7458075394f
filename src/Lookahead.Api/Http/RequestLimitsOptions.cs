using System.ComponentModel.DataAnnotations;
using Lookahead.Core.Validation;

namespace Lookahead.Api.Http;

/// <summary>Size limits checked before anything large is read or allocated ("Limits" section).</summary>
public sealed class RequestLimitsOptions
{
    public const string Section = "Limits";

    /// <summary>Largest body for model registration, plan and simulation requests.</summary>
    [Range(1024, 256L * 1024 * 1024)]
    public long MaxBodyBytes { get; set; } = 1024 * 1024;

    /// <summary>Largest replay body; replay streams, so this only bounds the upload, not memory.</summary>
    [Range(1024, long.MaxValue)]
    public long MaxReplayBodyBytes { get; set; } = 4L * 1024 * 1024 * 1024;

    /// <summary>Longest single replay row (one NDJSON line, one CSV record, one element of "requests").</summary>
    [Range(256, 16 * 1024 * 1024)]
    public int MaxReplayRowBytes { get; set; } = 64 * 1024;

    /// <summary>Deepest JSON nesting accepted; a model needs 4 levels, so 16 leaves room without inviting abuse.</summary>
    [Range(4, 64)]
    public int MaxJsonDepth { get; set; } = 16;

    /// <summary>Longest numeric array accepted anywhere while parsing, before the model's own limits apply.</summary>
    [Range(16, 1_000_000)]
    public int MaxArrayLength { get; set; } = 10_000;

    [Range(1, 10_000)]
    public int MaxStates { get; set; } = SizeLimits.Default.MaxStates;

    [Range(1, 10_000)]
    public int MaxInputs { get; set; } = SizeLimits.Default.MaxInputs;

    [Range(1, 10_000)]
    public int MaxOutputs { get; set; } = SizeLimits.Default.MaxOutputs;

    [Range(1, 100_000)]
    public int MaxHorizon { get; set; } = SizeLimits.Default.MaxHorizon;

    [Range(1, 100_000)]
    public int MaxDecisionVariables { get; set; } = SizeLimits.Default.MaxDecisionVariables;

    public SizeLimits ToSizeLimits() => new()
    {
        MaxStates = MaxStates,
        MaxInputs = MaxInputs,
        MaxOutputs = MaxOutputs,
        MaxHorizon = MaxHorizon,
        MaxDecisionVariables = MaxDecisionVariables,
    };
}
