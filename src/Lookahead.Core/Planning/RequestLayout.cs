namespace Lookahead.Core.Planning;

/// <summary>
/// The one order in which a request is stacked into a single vector:
/// <code>z = [x_0; r; x_s; u_s; u_{−1}]   (lengths n, p, n, m, m)</code>
/// It is the order of the unconstrained optimum U* = −(Kx·x_0 + Kr·r + Kxs·x_s + Kus·u_s + Kup·u_{−1}), so the
/// gradient maps F = [Fx Fr Fxs Fus Fup] of <see cref="Condensing"/>, the gains K = H⁻¹F of <see cref="GainSet"/>
/// and the cost form J* = zᵀMz of <see cref="CostForm"/> all index z the same way. The reference-driven blocks
/// (r, x_s, u_s) are contiguous because they are present or absent together; u_{−1} is last.
/// </summary>
internal readonly record struct RequestLayout(int StateCount, int InputCount, int OutputCount)
{
    public int StateStart => 0;

    public int ReferenceStart => StateCount;

    public int TargetStateStart => StateCount + OutputCount;

    public int TargetInputStart => (2 * StateCount) + OutputCount;

    public int PreviousInputStart => (2 * StateCount) + OutputCount + InputCount;

    /// <summary>2n + p + 2m.</summary>
    public int Size => (2 * StateCount) + OutputCount + (2 * InputCount);
}
