namespace Lookahead.Api.Models;

/// <summary>What the core measured when it compiled the model; read it before closing a loop.</summary>
public sealed record DiagnosticsDto(
    int ControllabilityRank,
    bool Controllable,
    bool Stabilisable,
    bool Detectable,
    double? OpenLoopSpectralRadius,
    double? RiccatiResidual,
    int? RiccatiIterations,
    double? HessianCondition,
    double? ClosedLoopSpectralRadius);
