using Lookahead.Core.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// One variant of the problem (with or without the Δu_0 term): the precomputed maps from each request-dependent
/// vector to the unconstrained optimum, U* = −(Kx·x_0 + Kr·r + Kxs·x_s + Kus·u_s + Kup·u_{−1}) (the request in
/// <see cref="RequestLayout"/> order), the optimal cost as a form of the request, and — when a plan can need it —
/// the Cholesky factor of the condensed Hessian. All maps are column-major with N·m rows, contiguous in one array
/// (see <see cref="DenseKernels.MultiplyAddColumns(ReadOnlySpan{double}, int, ReadOnlySpan{double}, Span{double})"/>);
/// immutable after construction.
/// </summary>
/// <remarks>
/// The factor is what limited plans (their solver starts from it), refined plans (each refinement step solves with
/// it) and plans with a reference schedule or a measured disturbance (one Newton step from the maps' answer) read;
/// the compiler keeps it for every model. The Hessian itself is never stored: it is
/// <see cref="FactoredSymmetricMatrix"/> over the factor.
/// </remarks>
internal sealed class GainSet
{
    private readonly double[] gains;
    private readonly RequestLayout layout;
    private readonly CholeskyFactor? factor;
    private readonly FactoredSymmetricMatrix? hessian;

    /// <param name="gains">K = H⁻¹F, N·m × <see cref="RequestLayout.Size"/>, column-major, kept (not copied).</param>
    /// <param name="factor">L with H = LLᵀ, or null when no plan of this model needs it.</param>
    public GainSet(int rows, RequestLayout layout, double[] gains, CostForm costForm, CholeskyFactor? factor)
    {
        if (gains.Length != rows * layout.Size)
        {
            throw new ArgumentException($"the gains have {gains.Length} entries; expected {rows}×{layout.Size}", nameof(gains));
        }

        if (factor is not null && factor.Size != rows)
        {
            throw new ArgumentException($"the factor is {factor.Size}×{factor.Size}; expected {rows}×{rows}", nameof(factor));
        }

        Rows = rows;
        this.layout = layout;
        this.gains = gains;
        this.factor = factor;
        hessian = factor is null ? null : new FactoredSymmetricMatrix(factor);
        CostForm = costForm;
    }

    /// <summary>
    /// H = ΓᵀQ̄Γ + R̄ + DᵀS̄D, so that J(U) = UᵀHU + 2fᵀU + const — computed from the factor entry by entry when read
    /// (see <see cref="FactoredSymmetricMatrix"/>).
    /// </summary>
    /// <exception cref="InvalidOperationException">The factor was not kept (<see cref="HasFactor"/>).</exception>
    public Matrix<double> Hessian => hessian ?? throw NotKept();

    /// <summary>Lower-triangular L with H = LLᵀ.</summary>
    /// <exception cref="InvalidOperationException">The factor was not kept (<see cref="HasFactor"/>).</exception>
    public CholeskyFactor Factor => factor ?? throw NotKept();

    /// <summary>True when the factor (and so <see cref="Hessian"/>) was kept: the model has limits or takes refinement steps.</summary>
    public bool HasFactor => factor is not null;

    /// <summary>J* as a quadratic form of the request, for first-move-only answers.</summary>
    public CostForm CostForm { get; }

    public ReadOnlySpan<double> Kx => Map(layout.StateStart, layout.StateCount);

    public ReadOnlySpan<double> Kr => Map(layout.ReferenceStart, layout.OutputCount);

    public ReadOnlySpan<double> Kxs => Map(layout.TargetStateStart, layout.StateCount);

    public ReadOnlySpan<double> Kus => Map(layout.TargetInputStart, layout.InputCount);

    public ReadOnlySpan<double> Kup => Map(layout.PreviousInputStart, layout.InputCount);

    /// <summary>N·m, the rows of every map.</summary>
    public int Rows { get; }

    /// <summary>Memory held: the maps, the cost form and the factor when kept (its square array).</summary>
    public long Bytes => sizeof(double) * ((long)gains.Length + ((long)CostForm.Size * CostForm.Size) + (factor is null ? 0 : (long)factor.Size * factor.Size));

    /// <summary>
    /// The unconstrained optimum's leading rows: destination = −(Kx·x_0 + Kr·r + Kxs·x_s + Kus·u_s + Kup·u_{−1}) over
    /// the first destination.Length rows — all N·m for a plan, m for the first move alone. An empty
    /// <paramref name="reference"/> drops the Kr, Kxs and Kus terms (the targets are zero then); an empty
    /// <paramref name="previousInput"/> drops Kup.
    /// </summary>
    public void Apply(ReadOnlySpan<double> state, ReadOnlySpan<double> reference, ReadOnlySpan<double> targetState, ReadOnlySpan<double> targetInput, ReadOnlySpan<double> previousInput, Span<double> destination)
    {
        int rows = Rows;
        destination.Clear();
        DenseKernels.MultiplyAddColumns(Kx, rows, state, destination);
        if (!reference.IsEmpty)
        {
            DenseKernels.MultiplyAddColumns(Kr, rows, reference, destination);
            DenseKernels.MultiplyAddColumns(Kxs, rows, targetState, destination);
            DenseKernels.MultiplyAddColumns(Kus, rows, targetInput, destination);
        }

        if (!previousInput.IsEmpty)
        {
            DenseKernels.MultiplyAddColumns(Kup, rows, previousInput, destination);
        }

        for (int i = 0; i < destination.Length; i++)
        {
            destination[i] = -destination[i];
        }
    }

    /// <summary>
    /// Turns the gradient maps of one variant into its gains and cost form, given H's factor: with Y = L⁻¹F,
    /// the cost form is M₀ − YᵀY (= M₀ − FᵀH⁻¹F, exactly symmetric and with no second product by F) and the gains
    /// are K = L⁻ᵀY, both solves in place in <paramref name="maps"/>.
    /// </summary>
    /// <param name="lower">L in the lower triangle of an N·m × N·m column-major array (the rest is not read).</param>
    /// <param name="maps">F on entry, K on return (N·m × <see cref="RequestLayout.Size"/>, column-major).</param>
    /// <param name="columns">How many leading columns of F can be nonzero; the rest are zero and stay so.</param>
    /// <param name="free">M₀ of this variant.</param>
    /// <returns>The cost form, or null when a gain is not finite (H too close to singular for its solves).</returns>
    public static CostForm? Solve(DenseLinearAlgebra algebra, double[] lower, int rows, RequestLayout layout, double[] maps, int columns, Matrix<double> free)
    {
        algebra.SolveLower(false, rows, columns, lower, rows, maps, rows);
        int size = layout.Size;
        var form = free.ToColumnMajorArray();
        algebra.Multiply(true, false, size, size, rows, -1.0, maps, rows, maps, rows, 1.0, form, size);
        algebra.SolveLower(true, rows, columns, lower, rows, maps, rows);
        return DenseKernels.AllFinite(maps) && DenseKernels.AllFinite(form) ? new CostForm(form, layout) : null;
    }

    private ReadOnlySpan<double> Map(int start, int count) => gains.AsSpan(start * Rows, count * Rows);

    private static InvalidOperationException NotKept() =>
        new("the Hessian's factor is kept only for models with limits or refinement steps, and this model has neither");
}
