using System.Numerics;

namespace Lookahead.Core.Planning;

/// <summary>What was measured on a model when it was compiled; read these before closing a loop.</summary>
/// <param name="ControllabilityRank">Numerical rank of [B, AB, …, A^{n−1}B] (relative tolerance <see cref="Numerics.SystemProperties.RankTolerance"/>).</param>
/// <param name="Controllable">Rank equals n.</param>
/// <param name="Stabilisable">PBH test on every eigenvalue with |λ| ≥ 1.</param>
/// <param name="Detectable">PBH test of (A, CᵀQC): every mode with |λ| ≥ 1 is seen by the output weight.</param>
/// <param name="OpenLoopSpectralRadius">ρ(A) of the discrete plant.</param>
/// <param name="RiccatiResidual">Relative residual of the terminal weight's Riccati equation, when it was solved.</param>
/// <param name="RiccatiIterations">Doubling steps, when the Riccati equation was solved.</param>
/// <param name="HessianCondition">λ_max/λ_min of the condensed Hessian.</param>
/// <param name="ClosedLoopSpectralRadius">ρ(A − BK) under the receding-horizon gain K.</param>
/// <param name="Warnings">What to read before closing a loop, as codes with their numbers.</param>
public sealed record ModelDiagnostics(
    int ControllabilityRank,
    bool Controllable,
    bool Stabilisable,
    bool Detectable,
    double OpenLoopSpectralRadius,
    double? RiccatiResidual,
    int? RiccatiIterations,
    double HessianCondition,
    double ClosedLoopSpectralRadius,
    IReadOnlyList<Warning> Warnings);

/// <summary>The receding-horizon feedback u_0 = −K x_0 (regulation, no previous input) and its closed loop.</summary>
/// <param name="K">m×n gain, row-major.</param>
public sealed record RecedingHorizonGain(double[][] K, Complex[] ClosedLoopEigenvalues, double SpectralRadius);
