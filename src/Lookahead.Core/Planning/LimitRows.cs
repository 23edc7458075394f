using Lookahead.Core.Numerics;
using Lookahead.Core.Optimization;
using Lookahead.Core.Validation;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// The limits of one problem variant as a fixed set of inequality rows n_jᵀz ≥ b_j over z = [U; ε], ε ≥ 0 one slack
/// per soft-limited output (shared over the horizon):
/// <list type="bullet">
/// <item>u_{k,i} ≥ umin_i, −u_{k,i} ≥ −umax_i;</item>
/// <item>Δu_{k,i} ≥ dmin_i, −Δu_{k,i} ≥ −dmax_i (k = 0 rows use u_{−1}; without one they are switched off);</item>
/// <item>y_{k,j} + ε_j ≥ ymin_j and −y_{k,j} + ε_j ≥ −ymax_j for k = 1 … N, with y_k = C(A^k x_0 + Σ_{i&lt;k} A^{k−1−i}B u_i);</item>
/// <item>ε_j ≥ 0.</item>
/// </list>
/// The normals and what each row stands for are built once; only the right-hand sides depend on the request
/// (<see cref="RightHandSides"/>): the first rate rows move with u_{−1} and the output rows with the free response C A^k x_0.
/// </summary>
internal sealed class LimitRows
{
    /// <summary>Largest number of stored output-row coefficients (N²·outputs·m/2); keeps memory bounded.</summary>
    public const long MaxOutputRowEntries = 10_000_000;

    private readonly int n;
    private readonly int m;
    private readonly int horizon;
    private readonly ValidatedLimits limits;
    private readonly int[] softOutputs;
    private readonly double[] outputFree; // rows (k−1)·ns + s of C A^k, row-major, n columns
    private readonly LimitRow[] meanings;
    private readonly double[] constantRhs;

    /// <param name="softOutputs">The outputs with a soft limit, in slack order (ε_s belongs to output softOutputs[s]).</param>
    public LimitRows(ValidatedModel model, Matrix<double> a, Matrix<double> b, int[] softOutputs)
    {
        n = model.StateCount;
        m = model.InputCount;
        horizon = model.Horizon;
        limits = model.Limits;
        this.softOutputs = softOutputs;
        var c = model.C;
        int ns = softOutputs.Length;
        int slackColumn = horizon * m;

        var normals = new List<IReadOnlyList<(int, double)>>();
        var meaning = new List<LimitRow>();
        var rhs = new List<double>();
        void Add(IReadOnlyList<(int, double)> row, LimitRow what, double value)
        {
            normals.Add(row);
            meaning.Add(what);
            rhs.Add(value);
        }

        for (int k = 0; k < horizon; k++)
        {
            for (int i = 0; i < m; i++)
            {
                int v = (k * m) + i;
                if (double.IsFinite(limits.InputMin[i]))
                {
                    Add([(v, 1.0)], new(LimitKind.InputMin, k, i), limits.InputMin[i]);
                }

                if (double.IsFinite(limits.InputMax[i]))
                {
                    Add([(v, -1.0)], new(LimitKind.InputMax, k, i), -limits.InputMax[i]);
                }
            }
        }

        for (int k = 0; k < horizon; k++)
        {
            for (int i = 0; i < m; i++)
            {
                int v = (k * m) + i;
                (int, double)[] up = k == 0 ? [(v, 1.0)] : [(v, 1.0), (v - m, -1.0)];
                (int, double)[] down = k == 0 ? [(v, -1.0)] : [(v, -1.0), (v - m, 1.0)];
                if (double.IsFinite(limits.InputRateMin[i]))
                {
                    Add(up, new(LimitKind.InputRateMin, k, i), limits.InputRateMin[i]);
                }

                if (double.IsFinite(limits.InputRateMax[i]))
                {
                    Add(down, new(LimitKind.InputRateMax, k, i), -limits.InputRateMax[i]);
                }
            }
        }

        // Output rows: y_k's dependence on u_i is C A^{k−1−i} B.
        outputFree = new double[horizon * ns * n];
        if (ns > 0)
        {
            var cPowers = new Matrix<double>[horizon]; // C A^d B, d = 0 … N−1
            var cA = c.Clone();
            for (int d = 0; d < horizon; d++)
            {
                cPowers[d] = cA * b;
                cA = cA * a;
            }

            var cAk = c * a;
            for (int k = 1; k <= horizon; k++)
            {
                for (int s = 0; s < ns; s++)
                {
                    int j = softOutputs[s];
                    for (int col = 0; col < n; col++)
                    {
                        outputFree[((((k - 1) * ns) + s) * n) + col] = cAk[j, col];
                    }

                    var coefficients = new List<(int, double)>((k * m) + 1);
                    for (int i = 0; i < k; i++)
                    {
                        var block = cPowers[k - 1 - i];
                        for (int col = 0; col < m; col++)
                        {
                            coefficients.Add(((i * m) + col, block[j, col]));
                        }
                    }

                    if (double.IsFinite(limits.OutputMin[j]))
                    {
                        Add([.. coefficients, (slackColumn + s, 1.0)], new(LimitKind.OutputMin, k, j), limits.OutputMin[j]);
                    }

                    if (double.IsFinite(limits.OutputMax[j]))
                    {
                        Add([.. coefficients.Select(e => (e.Item1, -e.Item2)), (slackColumn + s, 1.0)], new(LimitKind.OutputMax, k, j), -limits.OutputMax[j]);
                    }
                }

                cAk = cAk * a;
            }

            for (int s = 0; s < ns; s++)
            {
                Add([(slackColumn + s, 1.0)], new(LimitKind.OutputMax, 0, softOutputs[s], IsSlackBound: true), 0.0);
            }
        }

        meanings = [.. meaning];
        constantRhs = [.. rhs];
        Normals = new SparseRows(slackColumn + ns, normals);
    }

    /// <summary>The normals n_j, one row per limit row, over [U; ε].</summary>
    public SparseRows Normals { get; }

    public int Count => meanings.Length;

    /// <summary>Memory held: the sparse normals (a column index and a value per entry) and the free-response rows.</summary>
    public long Bytes => ((sizeof(int) + sizeof(double)) * (long)Normals.NonZeroCount) + (sizeof(double) * (long)outputFree.Length);

    /// <summary>Stored coefficients the output rows would need; checked before building.</summary>
    public static long OutputRowEntries(ValidatedModel model)
    {
        long bounded = Enumerable.Range(0, model.OutputCount).Count(j => double.IsFinite(model.Limits.OutputMin[j]) || double.IsFinite(model.Limits.OutputMax[j]));
        return bounded * model.Horizon * (model.Horizon + 1) / 2 * model.InputCount * 2;
    }

    /// <summary>What row <paramref name="index"/> stands for.</summary>
    public LimitRow Meaning(int index) => meanings[index];

    /// <summary>
    /// Right-hand sides for this request. The k = 0 rate rows of every input are switched off without a previous
    /// input, and those of each input in <paramref name="relaxedFirstRateInputs"/> (one that cannot reach its window
    /// within its rate limit, see <see cref="UnreachableFirstMoves"/>); every other input keeps its first rate limit.
    /// </summary>
    /// <param name="outputOffsets">
    /// What a measured disturbance adds to each predicted output, C d_k for k = 0 … N ((N+1) rows of p), or empty:
    /// it moves the output rows like the free response of x_0 does.
    /// </param>
    public void RightHandSides(ReadOnlySpan<double> x0, ReadOnlySpan<double> previousInput, IReadOnlyCollection<int> relaxedFirstRateInputs, Span<double> rhs, ReadOnlySpan<double> outputOffsets = default)
    {
        int p = outputOffsets.IsEmpty ? 0 : outputOffsets.Length / (horizon + 1);
        constantRhs.CopyTo(rhs);
        for (int row = 0; row < meanings.Length; row++)
        {
            var what = meanings[row];
            switch (what.Kind)
            {
                case LimitKind.InputRateMin when what.Step == 0:
                    rhs[row] = previousInput.IsEmpty || relaxedFirstRateInputs.Contains(what.Index) ? double.NegativeInfinity : rhs[row] + previousInput[what.Index];
                    break;
                case LimitKind.InputRateMax when what.Step == 0:
                    rhs[row] = previousInput.IsEmpty || relaxedFirstRateInputs.Contains(what.Index) ? double.NegativeInfinity : rhs[row] - previousInput[what.Index];
                    break;
                case LimitKind.OutputMin when !what.IsSlackBound:
                    rhs[row] -= FreeResponse(what.Step, what.Index, x0) + (p == 0 ? 0 : outputOffsets[(what.Step * p) + what.Index]);
                    break;
                case LimitKind.OutputMax when !what.IsSlackBound:
                    rhs[row] += FreeResponse(what.Step, what.Index, x0) + (p == 0 ? 0 : outputOffsets[(what.Step * p) + what.Index]);
                    break;
            }
        }
    }

    /// <summary>The inputs that cannot satisfy both the input window and the first rate limit from u_{−1}.</summary>
    public IReadOnlyList<int> UnreachableFirstMoves(ReadOnlySpan<double> previousInput)
    {
        var result = new List<int>();
        if (previousInput.IsEmpty)
        {
            return result;
        }

        for (int i = 0; i < m; i++)
        {
            double low = Math.Max(limits.InputMin[i], previousInput[i] + limits.InputRateMin[i]);
            double high = Math.Min(limits.InputMax[i], previousInput[i] + limits.InputRateMax[i]);
            if (low > high + (DualActiveSetSolver.FeasibilityTolerance * (1 + Math.Abs(high))))
            {
                result.Add(i);
            }
        }

        return result;
    }

    /// <summary>Puts every u_{k,i} back inside [umin_i, umax_i].</summary>
    /// <summary>
    /// Makes a plan that stopped early respect every hard limit: one forward pass puts each u_k inside its input window
    /// and within its rate limits of u_{k−1} (u_{−1} when given). The first move of an input in
    /// <paramref name="relaxed"/> keeps only its input window, as in the solve. The pass is exact for these limits:
    /// the window for u_k only depends on u_{k−1}, which is already inside its own.
    /// </summary>
    public void ProjectOntoHardLimits(Span<double> inputs, ReadOnlySpan<double> previousInput, IReadOnlyList<int> relaxed)
    {
        for (int k = 0; k < horizon; k++)
        {
            for (int i = 0; i < m; i++)
            {
                double low = limits.InputMin[i];
                double high = limits.InputMax[i];
                bool hasPrevious = k > 0 || (!previousInput.IsEmpty && !relaxed.Contains(i));
                if (hasPrevious)
                {
                    double before = k > 0 ? inputs[((k - 1) * m) + i] : previousInput[i];
                    low = Math.Max(low, before + limits.InputRateMin[i]);
                    high = Math.Min(high, before + limits.InputRateMax[i]);
                }

                ref double v = ref inputs[(k * m) + i];
                v = low <= high ? Math.Clamp(v, low, high) : Math.Clamp(v, limits.InputMin[i], limits.InputMax[i]);
            }
        }
    }

    public void ClipToInputLimits(Span<double> inputs)
    {
        for (int k = 0; k < horizon; k++)
        {
            for (int i = 0; i < m; i++)
            {
                ref double v = ref inputs[(k * m) + i];
                v = Math.Clamp(v, limits.InputMin[i], limits.InputMax[i]);
            }
        }
    }

    /// <summary>C A^k x_0 for one soft-limited output: the part of y_k that no input can change.</summary>
    private double FreeResponse(int step, int output, ReadOnlySpan<double> x0)
    {
        int ns = softOutputs.Length;
        int s = Array.IndexOf(softOutputs, output);
        return DenseKernels.Dot(outputFree.AsSpan((((step - 1) * ns) + s) * n, n), x0);
    }
}
