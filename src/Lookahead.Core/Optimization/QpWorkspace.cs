namespace Lookahead.Core.Optimization;

/// <summary>
/// Scratch memory for one solve; rented from a pool so that concurrent plans never share one. It also keeps the
/// factorisation of the last solve's active set, so a caller that owns a workspace (replay, a closed loop) can warm
/// start the next solve of the same program from it.
/// </summary>
public sealed class QpWorkspace
{
    /// <param name="withJ">False for a solver in range-space form, which never reads J (its M = L⁻¹ lives in
    /// <see cref="RangeSpaceScratch"/>): n² doubles not held by every pooled workspace.</param>
    public QpWorkspace(int variables, int constraints, bool withJ = true)
    {
        Variables = variables;
        Constraints = constraints;
        J = withJ ? new double[variables * variables] : [];
        R = new double[variables * variables];
        D = new double[variables];
        Z = new double[variables];
        Step = new double[variables];
        Multipliers = new double[variables + 1];
        Active = new int[variables + 1];
        IsActive = new bool[constraints];
        Start = new double[variables];
    }

    public int Variables { get; }

    public int Constraints { get; }

    /// <summary>J = L⁻ᵀQ, column-major (column c at c·n).</summary>
    internal double[] J { get; }

    /// <summary>Upper-triangular R of the active normals, column-major (column c at c·n).</summary>
    internal double[] R { get; }

    internal double[] D { get; }

    internal double[] Z { get; }

    internal double[] Step { get; }

    internal double[] Multipliers { get; }

    internal int[] Active { get; }

    internal bool[] IsActive { get; }

    /// <summary>The unconstrained minimiser of the current solve, kept while a warm start rebuilds its point.</summary>
    internal double[] Start { get; }

    /// <summary>
    /// Size of the active set whose factorisation J, R (and <see cref="Active"/>) the last solve left here, or −1 when
    /// there is none to start from. A warm start resumes from it.
    /// </summary>
    internal int FactoredCount { get; set; } = -1;

    /// <summary>Size of the active set the last solve ended with (factored or found by the guesser).</summary>
    internal int LastActiveCount { get; set; }

    /// <summary>The range-space iteration's per-row scratch (<see cref="RangeSpaceActiveSet"/>), made on first use.</summary>
    internal RangeSpaceScratch? RangeSpaceScratch { get; set; }

    /// <summary>The guesser's scratch, made on its first use (<see cref="PrimalDualActiveSet"/>).</summary>
    internal ActiveSetGuessScratch? ActiveSetGuess { get; set; }

    /// <summary>Warm starts in a row since J was last rebuilt from J₀ (rounding accumulates in the updates).</summary>
    internal int WarmChain { get; set; }

    /// <summary>Multipliers of the final active set, in the order of <see cref="ActiveConstraints"/>.</summary>
    public ReadOnlySpan<double> ActiveMultipliers(int count) => Multipliers.AsSpan(0, count);

    /// <summary>Indices of the final active set.</summary>
    public ReadOnlySpan<int> ActiveConstraints(int count) => Active.AsSpan(0, count);
}
