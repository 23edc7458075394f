using Lookahead.Api.Http;

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
    double? ClosedLoopSpectralRadius,
    EstimatorDiagnosticsDto? Estimator = null);

/// <summary>The estimator's error dynamics: eigenvalues of A_a − A_a L C_a (all inside the unit circle) and their largest modulus.</summary>
public sealed record EstimatorDiagnosticsDto(string DisturbanceModel, int DisturbanceCount, double SpectralRadius, IReadOnlyList<ComplexDto> Eigenvalues);
