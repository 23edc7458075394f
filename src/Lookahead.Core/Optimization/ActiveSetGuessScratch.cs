namespace Lookahead.Core.Optimization;

/// <summary>Per-solve memory of <see cref="PrimalDualActiveSet"/> for a program of n variables and p rows.</summary>
internal sealed class ActiveSetGuessScratch(int variables, int rows)
{
    /// <summary>c = Nx₀ − b (+∞ for rows switched off).</summary>
    public double[] Offsets { get; } = new double[rows];

    public double[] Slacks { get; } = new double[rows];

    public bool[] InSet { get; } = new bool[rows];

    /// <summary>The current guess; never more rows than variables (more would be dependent).</summary>
    public int[] Set { get; } = new int[variables + 1];

    /// <summary>Violations (per unit normal) of the rows outside the guess, and those rows, for sorting.</summary>
    public double[] Violations { get; } = new double[rows];

    public int[] Violated { get; } = new int[rows];

    public double[] Lambda { get; } = new double[variables];

    /// <summary>Cholesky factor of S_AA, row-major with stride n (so a kept prefix of the guess keeps its rows).</summary>
    public double[] Factor { get; } = new double[variables * variables];
}
