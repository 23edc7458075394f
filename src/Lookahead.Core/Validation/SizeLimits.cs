namespace Lookahead.Core.Validation;

/// <summary>
/// Largest model the service accepts. Checked before any matrix is allocated, so a hostile document
/// cannot make compilation take unbounded memory or time.
/// </summary>
public sealed record SizeLimits
{
    public int MaxStates { get; init; } = 200;

    public int MaxInputs { get; init; } = 50;

    public int MaxOutputs { get; init; } = 200;

    public int MaxHorizon { get; init; } = 500;

    /// <summary>Largest N·m, the number of decision variables.</summary>
    public int MaxDecisionVariables { get; init; } = 2000;

    public static SizeLimits Default { get; } = new();
}
