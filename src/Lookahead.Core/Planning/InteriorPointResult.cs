namespace Lookahead.Core.Planning;

/// <summary>Outcome of one interior-point solve; the solution itself is written into the caller's spans.</summary>
/// <param name="Status">How the solve ended.</param>
/// <param name="Iterations">Predictor–corrector iterations taken (each one Riccati factorisation and two sweeps); a successful polish counts as one.</param>
/// <param name="FirstRateRowsDropped">
/// True when some input could not reach its window from u_{−1} within one rate step; the k = 0 rate rows were then
/// left out, as the active-set path does, and the plan must be reported as such.
/// </param>
internal readonly record struct InteriorPointResult(InteriorPointStatus Status, int Iterations, bool FirstRateRowsDropped);
