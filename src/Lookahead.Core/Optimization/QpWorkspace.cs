namespace Lookahead.Core.Optimization;

/// <summary>Scratch memory for one solve; rented from a pool so that concurrent plans never share one.</summary>
public sealed class QpWorkspace
{
    public QpWorkspace(int variables, int constraints)
    {
        Variables = variables;
        Constraints = constraints;
        J = new double[variables * variables];
        R = new double[variables * variables];
        D = new double[variables];
        Z = new double[variables];
        Step = new double[variables];
        Multipliers = new double[variables + 1];
        Active = new int[variables + 1];
        IsActive = new bool[constraints];
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

    /// <summary>Multipliers of the final active set, in the order of <see cref="ActiveConstraints"/>.</summary>
    public ReadOnlySpan<double> ActiveMultipliers(int count) => Multipliers.AsSpan(0, count);

    /// <summary>Indices of the final active set.</summary>
    public ReadOnlySpan<int> ActiveConstraints(int count) => Active.AsSpan(0, count);
}
