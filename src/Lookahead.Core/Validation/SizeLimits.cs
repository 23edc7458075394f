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

    /// <summary>
    /// Largest N·m, the number of decision variables. 1000 keeps the largest limited model (n = 200, all limit kinds)
    /// within about 4 s of compiling and 80 MB kept on this project's 2-core reference machine; at 2000 a limited
    /// model keeps two dense (N·m)² matrices per variant (the solver's L⁻ᵀ and the factor, 32 MB each) and takes
    /// over 6 s. Raise it where memory and registration time allow (a model without limits at 2000: under 3 s, 29 MB).
    /// </summary>
    public int MaxDecisionVariables { get; init; } = 1000;

    public static SizeLimits Default { get; } = new();
}
