using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Numerics;

/// <summary>The stabilising solution P of the discrete algebraic Riccati equation and what was measured on it.</summary>
/// <param name="P">n×n symmetric positive semidefinite solution.</param>
/// <param name="Gain">K = (R + BᵀPB)⁻¹BᵀPA, m×n; u = −Kx is the infinite-horizon optimal feedback.</param>
/// <param name="RelativeResidual">‖AᵀPA − P − AᵀPB K + Q‖_F / (‖AᵀPA‖_F + ‖P‖_F + ‖Q‖_F).</param>
/// <param name="ClosedLoopSpectralRadius">ρ(A − BK), &lt; 1 for a stabilising solution.</param>
/// <param name="Iterations">Doubling steps taken.</param>
public sealed record RiccatiSolution(
    Matrix<double> P,
    Matrix<double> Gain,
    double RelativeResidual,
    double ClosedLoopSpectralRadius,
    int Iterations);
