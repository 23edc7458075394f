namespace Lookahead.Core.Optimization;

/// <summary>Per-row arrays of one <see cref="RangeSpaceActiveSet"/> solve, kept with its workspace.</summary>
internal sealed class RangeSpaceScratch(int rows, int variables, int candidates)
{
    /// <summary>Row stride of <see cref="Inverse"/> and length of the vectors it multiplies: the variables and three more, a multiple of four.</summary>
    public int InverseStride { get; } = StrideFor(variables);

    /// <summary>Per row (in the order a full pass reads them), the scaled value below which it counts as violated; −∞ while active or switched off.</summary>
    public double[] Limits { get; } = new double[rows];

    /// <summary>Per row (in the order a full pass reads them), n_jᵀx₀ − b_j at the unconstrained minimiser.</summary>
    public double[] BaseSlack { get; } = new double[rows];

    /// <summary>Per row (in the order a full pass reads them), n_jᵀx/‖n_j‖ at the last full pass.</summary>
    public double[] Values { get; } = new double[rows];

    /// <summary>Per row (in the order a full pass reads them), b_j/‖n_j‖.</summary>
    public double[] ScaledRhs { get; } = new double[rows];

    /// <summary>The rows most violated at the last full pass, most violated first.</summary>
    public int[] Candidates { get; } = new int[candidates];

    /// <summary>S_pA of the row being looked at or added (length <see cref="InverseStride"/>).</summary>
    public double[] CandidateRow { get; } = new double[StrideFor(variables)];

    /// <summary>M = L⁻¹ of the active rows, row-major with stride <see cref="InverseStride"/>.</summary>
    public double[] Inverse { get; } = new double[variables * StrideFor(variables)];

    /// <summary>y = M·s of the last product.</summary>
    public double[] Forward { get; } = new double[StrideFor(variables)];

    /// <summary>The dual direction r.</summary>
    public double[] Direction { get; } = new double[StrideFor(variables)];

    /// <summary>A row set aside by a drop, and scratch for products.</summary>
    public double[] Spare { get; } = new double[StrideFor(variables)];

    /// <summary>At least the variables and three more (a row's zeros may run three past its diagonal), a multiple of four.</summary>
    private static int StrideFor(int variables) => (variables + 6) & ~3;
}
