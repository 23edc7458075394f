using Lookahead.Core.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// Builds the condensed quadratic program without forming the prediction matrix Γ (which would be nN×Nm).
/// With V_{N−1} = P, V_l = CᵀQC + AᵀV_{l+1}A and Z_l = V_l B, the blocks are
/// H_{jl} = (A^{l−j}B)ᵀ Z_l (j ≤ l) and the state-gradient blocks are Z_jᵀ A^{j+1}.
/// The two variants (with and without the Δu_0 term) share all of this: the term adds S to the Hessian's first
/// diagonal block, −S to the first block of the map for u_{−1}, and S to the free cost's u_{−1} block — so the
/// program is condensed once, without the term, and <see cref="Problem"/> says how the other variant differs.
/// </summary>
internal static class Condensing
{
    /// <summary>
    /// The Hessian and the gradient maps f = Fx·x_0 + Fr·r + Fxs·x_s + Fus·u_s + Fup·u_{−1} (each N·m rows), so that
    /// J(U) = UᵀHU + 2fᵀU + zᵀM₀z with z the request in <see cref="RequestLayout"/> order, which is also the order
    /// of the maps above.
    /// </summary>
    /// <param name="FreeCost">M₀: J at U = 0 as a quadratic form of z (see <see cref="CostForm.Assemble"/>).</param>
    public sealed record Result(Matrix<double> Hessian, Matrix<double> Fx, Matrix<double> Fr, Matrix<double> Fxs, Matrix<double> Fus, Matrix<double> Fup, Matrix<double> FreeCost);

    /// <summary>
    /// The condensed program without the Δu_0 term, on column-major arrays, and the rate weight S that the other
    /// variant adds (<see cref="AddPreviousInputTerm"/>, <see cref="PreviousInputMap"/>, <see cref="FreeCostWithPreviousInput"/>).
    /// </summary>
    public sealed class Problem
    {
        internal Problem(RequestLayout layout, int rows, double[] hessian, double[] maps, Matrix<double> freeCost, Matrix<double> rateWeight)
        {
            Layout = layout;
            Rows = rows;
            Hessian = hessian;
            Maps = maps;
            FreeCost = freeCost;
            RateWeight = rateWeight;
        }

        public RequestLayout Layout { get; }

        /// <summary>N·m.</summary>
        public int Rows { get; }

        /// <summary>H without the Δu_0 term: N·m × N·m, column-major, exactly symmetric. The caller may factor it in place.</summary>
        public double[] Hessian { get; }

        /// <summary>F = [Fx Fr Fxs Fus Fup], N·m × <see cref="RequestLayout.Size"/>, column-major; Fup is zero (no Δu_0 term). The caller may overwrite it.</summary>
        public double[] Maps { get; }

        /// <summary>M₀ without the Δu_0 term.</summary>
        public Matrix<double> FreeCost { get; }

        /// <summary>S, the weight of Δu_k.</summary>
        public Matrix<double> RateWeight { get; }

        /// <summary>True when the variants differ (S ≠ 0).</summary>
        public bool HasRateWeight => RateWeight.Enumerate().Any(v => v != 0);

        /// <summary>
        /// Adds the Δu_0 term to a Hessian held in the lower triangle of <paramref name="hessian"/> (column-major,
        /// N·m × N·m): (S + Sᵀ)/2 on the first diagonal block, as symmetrising the variant's own assembly gives.
        /// </summary>
        public void AddPreviousInputTerm(Span<double> hessian)
        {
            int m = Layout.InputCount;
            for (int j = 0; j < m; j++)
            {
                for (int i = j; i < m; i++)
                {
                    hessian[(j * Rows) + i] += (RateWeight[i, j] + RateWeight[j, i]) * 0.5;
                }
            }
        }

        /// <summary>Writes Fup with the Δu_0 term (−S in the first block row, zero below) into its columns of <paramref name="maps"/>.</summary>
        public void PreviousInputMap(Span<double> maps)
        {
            int m = Layout.InputCount;
            var fup = maps.Slice(Layout.PreviousInputStart * Rows, m * Rows);
            fup.Clear();
            for (int j = 0; j < m; j++)
            {
                for (int i = 0; i < m; i++)
                {
                    fup[(j * Rows) + i] = -RateWeight[i, j];
                }
            }
        }

        /// <summary>M₀ with the Δu_0 term: S on the u_{−1} block.</summary>
        public Matrix<double> FreeCostWithPreviousInput()
        {
            var free = FreeCost.Clone();
            free.SetSubMatrix(Layout.PreviousInputStart, Layout.PreviousInputStart, RateWeight);
            return free;
        }
    }

    /// <summary>One variant as MathNet matrices (copies): the form the plan-parts benchmark reads.</summary>
    public static Result Build(
        Matrix<double> a,
        Matrix<double> b,
        Matrix<double> c,
        Matrix<double> q,
        Matrix<double> r,
        Matrix<double> s,
        Matrix<double> p,
        int horizon,
        bool withPreviousInput)
    {
        var problem = Condense(a, b, c, q, r, s, p, horizon, DenseLinearAlgebra.Default);
        int rows = problem.Rows;
        var hessian = (double[])problem.Hessian.Clone();
        var maps = problem.Maps;
        var free = problem.FreeCost;
        if (withPreviousInput)
        {
            problem.AddPreviousInputTerm(hessian);
            MirrorLowerToUpper(hessian, rows, 0, problem.Layout.InputCount);
            problem.PreviousInputMap(maps);
            free = problem.FreeCostWithPreviousInput();
        }

        var layout = problem.Layout;
        Matrix<double> Columns(int from, int count) => Matrix<double>.Build.Dense(rows, count, maps.AsSpan(from * rows, count * rows).ToArray());
        return new Result(
            Matrix<double>.Build.Dense(rows, rows, hessian),
            Columns(layout.StateStart, layout.StateCount),
            Columns(layout.ReferenceStart, layout.OutputCount),
            Columns(layout.TargetStateStart, layout.StateCount),
            Columns(layout.TargetInputStart, layout.InputCount),
            Columns(layout.PreviousInputStart, layout.InputCount),
            free);
    }

    /// <summary>The program without the Δu_0 term; the products run on <paramref name="algebra"/>.</summary>
    public static Problem Condense(
        Matrix<double> a,
        Matrix<double> b,
        Matrix<double> c,
        Matrix<double> q,
        Matrix<double> r,
        Matrix<double> s,
        Matrix<double> p,
        int horizon,
        DenseLinearAlgebra algebra)
    {
        int n = a.RowCount;
        int m = b.ColumnCount;
        int outputs = c.RowCount;
        int rows = horizon * m;
        int block = n * m;
        var layout = new RequestLayout(n, m, outputs);
        var la = algebra;
        double[] am = a.ToColumnMajorArray();
        double[] bm = b.ToColumnMajorArray();
        double[] cm = c.ToColumnMajorArray();
        double[] qm = q.ToColumnMajorArray();
        double[] pm = p.ToColumnMajorArray();

        // CᵀQC and CᵀQ.
        var qc = new double[outputs * n];
        la.Multiply(false, false, outputs, n, outputs, 1.0, qm, outputs, cm, outputs, 0.0, qc, outputs);
        var qx = new double[n * n];
        la.Multiply(true, false, n, n, outputs, 1.0, cm, outputs, qc, outputs, 0.0, qx, n);
        var ctq = new double[n * outputs];
        la.Multiply(true, false, n, outputs, outputs, 1.0, cm, outputs, qm, outputs, 0.0, ctq, n);

        // A^k B stacked in reverse, n × N·m: block j is A^{N−1−j}B, so the blocks A^{l−j}B (j = 0 … l) that one
        // column block of H needs are the contiguous last l + 1 blocks. Beside them, block j of `sums` is
        // Σ_{i ≤ N−2−j} A^i B (zero for j = N−1): the inputs' shares of the summed stage outputs.
        var reversed = new double[n * rows];
        var sums = new double[n * rows];
        bm.CopyTo(reversed, (horizon - 1) * block);
        for (int k = 1; k < horizon; k++)
        {
            la.Multiply(false, false, n, m, n, 1.0, am, n, reversed.AsSpan((horizon - k) * block), n, 0.0, reversed.AsSpan((horizon - 1 - k) * block), n);
        }

        for (int j = horizon - 2; j >= 0; j--)
        {
            var target = sums.AsSpan(j * block, block);
            sums.AsSpan((j + 1) * block, block).CopyTo(target);
            Add(reversed.AsSpan((j + 1) * block, block), target);
        }

        // Z_l = V_l B, stacked n × N·m, from V_{N−1} = P and V_l = CᵀQC + AᵀV_{l+1}A.
        var z = new double[n * rows];
        var v = (double[])pm.Clone();
        var product = new double[n * n];
        la.Multiply(false, false, n, m, n, 1.0, v, n, bm, n, 0.0, z.AsSpan((horizon - 1) * block), n);
        for (int l = horizon - 2; l >= 0; l--)
        {
            StepCostToGo(la, n, am, qx, v, product);
            la.Multiply(false, false, n, m, n, 1.0, v, n, bm, n, 0.0, z.AsSpan(l * block), n);
        }

        // Cost-to-go of the free response from x_0: CᵀQC + AᵀV_0A.
        StepCostToGo(la, n, am, qx, v, product);
        var freeStateWeight = v;

        // H: column block l, rows 0 … (l+1)m, is [A^l B … A^0 B]ᵀ Z_l in one product; the block-lower part mirrors it.
        var hessian = new double[(long)rows * rows];
        for (int l = 0; l < horizon; l++)
        {
            la.Multiply(true, false, (l + 1) * m, m, n, 1.0, reversed.AsSpan((horizon - 1 - l) * block), n, z.AsSpan(l * block), n, 0.0, hessian.AsSpan(l * m * rows), rows);
        }

        MirrorBlockUpperToLower(hessian, rows, m);
        AddInputWeights(hessian, rows, m, horizon, r, s);

        // Exact symmetry, so the factorisation sees the matrix that was meant. Only the blocks that R and S touch
        // can differ from their mirror images: every other block was copied from its mirror just above.
        for (int k = 0; k < horizon; k++)
        {
            Symmetrise(hessian, rows, k * m, k * m, m);
            if (k + 1 < horizon)
            {
                Symmetrise(hessian, rows, k * m, (k + 1) * m, m);
            }
        }

        var maps = new double[(long)rows * layout.Size];

        // Fx: block j is Z_jᵀA^{j+1}. The powers of A also sum to Σ_{k<N} A^k for the reference cross term.
        var power = (double[])am.Clone();
        var next = new double[n * n];
        var powerSum = new double[n * n];
        for (int i = 0; i < n; i++)
        {
            powerSum[(i * n) + i] = 1.0;
        }

        for (int j = 0; j < horizon; j++)
        {
            la.Multiply(true, false, m, n, n, 1.0, z.AsSpan(j * block), n, power, n, 0.0, maps.AsSpan((layout.StateStart * rows) + (j * m)), rows);
            if (j + 1 < horizon)
            {
                Add(power, powerSum);
                la.Multiply(false, false, n, n, n, 1.0, am, n, power, n, 0.0, next, n);
                (power, next) = (next, power);
            }
        }

        var aToTheN = power;

        // Stage output terms i = j+1 … N−1 see u_j through A^{i−1−j}B: Fr = −ΣᵀCᵀQ.
        la.Multiply(true, false, rows, outputs, n, -1.0, sums, n, ctq, n, 0.0, maps.AsSpan(layout.ReferenceStart * rows), rows);

        // The terminal state sees u_j through A^{N−1−j}B: Fxs = −(reversed)ᵀP.
        la.Multiply(true, false, rows, n, n, -1.0, reversed, n, pm, n, 0.0, maps.AsSpan(layout.TargetStateStart * rows), rows);

        // Fus: −R in every block row. Fup stays zero in this variant.
        var fus = maps.AsSpan(layout.TargetInputStart * rows, m * rows);
        for (int j = 0; j < m; j++)
        {
            for (int k = 0; k < horizon; k++)
            {
                for (int i = 0; i < m; i++)
                {
                    fus[(j * rows) + (k * m) + i] = -r[i, j];
                }
            }
        }

        // Σ_{k=0}^{N−1} (CA^k)ᵀQ = (Σ_k A^k)ᵀ CᵀQ.
        var referenceCross = new double[n * outputs];
        la.Multiply(true, false, n, outputs, n, 1.0, powerSum, n, ctq, n, 0.0, referenceCross, n);
        var terminalCross = new double[n * n];
        la.Multiply(true, false, n, n, n, -1.0, aToTheN, n, pm, n, 0.0, terminalCross, n);

        var build = Matrix<double>.Build;
        var free = CostForm.Assemble(
            n, m, outputs,
            build.Dense(n, n, freeStateWeight),
            -build.Dense(n, outputs, referenceCross),
            q * horizon,
            build.Dense(n, n, terminalCross),
            p,
            r * horizon,
            null);
        return new Problem(layout, rows, hessian, maps, free, s);
    }

    /// <summary>v ← CᵀQC + AᵀvA, with <paramref name="product"/> as scratch (n×n each, column-major).</summary>
    private static void StepCostToGo(DenseLinearAlgebra la, int n, double[] a, double[] qx, double[] v, double[] product)
    {
        la.Multiply(false, false, n, n, n, 1.0, v, n, a, n, 0.0, product, n);
        qx.CopyTo(v, 0);
        la.Multiply(true, false, n, n, n, 1.0, a, n, product, n, 1.0, v, n);
    }

    /// <summary>y += x.</summary>
    private static void Add(ReadOnlySpan<double> x, Span<double> y) => DenseKernels.Axpy(1.0, x, y);

    /// <summary>Copies every block above the block diagonal (m×m blocks) to its mirror position below it, in tiles that stay in cache.</summary>
    private static void MirrorBlockUpperToLower(double[] h, int rows, int m)
    {
        const int Tile = 64;
        for (int j0 = 0; j0 < rows; j0 += Tile)
        {
            for (int i0 = j0; i0 < rows; i0 += Tile)
            {
                int jEnd = Math.Min(rows, j0 + Tile);
                int iEnd = Math.Min(rows, i0 + Tile);
                for (int j = j0; j < jEnd; j++)
                {
                    // Rows strictly below column j's diagonal block.
                    int first = Math.Max(i0, ((j / m) + 1) * m);
                    for (int i = first; i < iEnd; i++)
                    {
                        h[((long)j * rows) + i] = h[((long)i * rows) + j];
                    }
                }
            }
        }
    }

    /// <summary>Copies the lower triangle of the m×m-wide square at (start, start) … to its upper triangle.</summary>
    private static void MirrorLowerToUpper(double[] h, int rows, int start, int size)
    {
        for (int j = start; j < start + size; j++)
        {
            for (int i = j + 1; i < start + size; i++)
            {
                h[((long)i * rows) + j] = h[((long)j * rows) + i];
            }
        }
    }

    /// <summary>R on every diagonal block; S for Δu_k = u_k − u_{k−1}, k ≥ 1 (the variant without the Δu_0 term).</summary>
    private static void AddInputWeights(double[] h, int rows, int m, int horizon, Matrix<double> r, Matrix<double> s)
    {
        for (int k = 0; k < horizon; k++)
        {
            AddBlock(h, rows, k, k, m, r, 1.0);

            // u_k appears in Δu_k (k ≥ 1) and in Δu_{k+1}.
            double diagonalCount = (k >= 1 ? 1 : 0) + (k + 1 < horizon ? 1 : 0);
            AddBlock(h, rows, k, k, m, s, diagonalCount);
            if (k + 1 < horizon)
            {
                AddBlock(h, rows, k, k + 1, m, s, -1.0);
                AddBlock(h, rows, k + 1, k, m, s, -1.0);
            }
        }
    }

    private static void AddBlock(double[] h, int rows, int blockRow, int blockColumn, int m, Matrix<double> block, double scale)
    {
        if (scale == 0)
        {
            return;
        }

        for (int j = 0; j < m; j++)
        {
            for (int i = 0; i < m; i++)
            {
                h[((long)((blockColumn * m) + j) * rows) + (blockRow * m) + i] += scale * block[i, j];
            }
        }
    }

    /// <summary>The m×m blocks at (row, column) and (column, row) become the halves of their sum with the other's transpose.</summary>
    private static void Symmetrise(double[] h, int rows, int row, int column, int m)
    {
        for (int j = 0; j < m; j++)
        {
            for (int i = 0; i < m; i++)
            {
                long upper = ((long)(column + j) * rows) + row + i;
                long lower = ((long)(row + i) * rows) + column + j;
                if (upper == lower)
                {
                    continue;
                }

                double mean = (h[upper] + h[lower]) * 0.5;
                h[upper] = mean;
                h[lower] = mean;
            }
        }
    }
}
