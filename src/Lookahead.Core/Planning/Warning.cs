using System.Numerics;

namespace Lookahead.Core.Planning;

/// <summary>
/// One warning as a code with the numbers it is about; fields a code does not use stay null
/// (see <see cref="WarningCode"/> for which code carries which).
/// </summary>
public sealed record Warning(WarningCode Code)
{
    /// <summary>Index of the input concerned.</summary>
    public int? Input { get; init; }

    /// <summary>Index of the output concerned.</summary>
    public int? Output { get; init; }

    /// <summary>Step of the horizon concerned (0-based).</summary>
    public int? Step { get; init; }

    /// <summary>Kind of limit concerned.</summary>
    public LimitKind? Limit { get; init; }

    /// <summary>The size of the matter: an excess, a distance, a spectral radius, a condition number.</summary>
    public double? Amount { get; init; }

    /// <summary>A count: an iteration cap, a number of steps, a rank.</summary>
    public int? Count { get; init; }

    /// <summary>The mode concerned.</summary>
    public Complex? Eigenvalue { get; init; }
}
