using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;
using static Lookahead.Core.Optimization.PointerKernels;

namespace Lookahead.Core.Optimization;

/// <summary>
/// The rows of a program laid out for passes over all of them at one point (n_jᵀx/‖n_j‖ for every j), which the
/// range-space method makes whenever its short list of candidates runs dry.
/// <para>
/// Limits come in mirrored pairs: a window [lo, hi] on a quantity gives the rows n ≥ lo and −n ≥ −hi. A row whose
/// columns match an earlier one's and whose values are that row's negated (over all its entries, or for a soft output
/// limit over all but the slack's) is that row's mirror, and its value is the other's negated plus the few entries
/// where they differ; only one of the two is read from x. Positions run: mirrored rows with one or two entries (bounds
/// and rate limits), then their mirrors in the same order, then the other rows with one or two entries; then the longer
/// rows that are not mirrors (output limits), then the mirrors of those.
/// </para>
/// <para>
/// Four rows with one or two entries whose columns run on (bounds and rate limits of one input after another) read x
/// by loads, others by gathers; a longer row's run of consecutive columns is padded with zeros to whole vectors where
/// x has the columns. Measured on the demo (docs/performance.md): the mirrors (with a candidate list of 16) took a
/// plan from 64 to 54–56 µs, the loads about 4 % more.
/// </para>
/// </summary>
internal sealed unsafe class RowSweep
{
    /// <summary>Shortest run of negated entries for which two long rows count as mirrors.</summary>
    private const int MinimumMirroredEntries = 4;

    private readonly SparseRows rows;
    private readonly int p;

    /// <summary>Rows with one or two entries that have a mirror: positions [0, T), their mirrors at [T, 2T).</summary>
    private readonly int mirroredPairs;

    /// <summary>Positions [0, pairCount) hold the rows with one or two entries.</summary>
    private readonly int pairCount;

    /// <summary>Positions [pairCount, pairCount + primaryCount) hold the longer rows that are no mirrors.</summary>
    private readonly int primaryCount;

    /// <summary>By position below <see cref="pairCount"/>: the rows' two column–value pairs scaled by 1/‖n_j‖ (a single entry's second value is 0).</summary>
    private readonly int[] firstColumns;
    private readonly int[] secondColumns;
    private readonly double[] firstValues;
    private readonly double[] secondValues;

    /// <summary>
    /// Per position below <see cref="pairCount"/>, whether the four pair rows from it read consecutive columns in both
    /// their entries (bounds and rate limits of one input after another): then x is loaded, not gathered.
    /// </summary>
    private readonly bool[] consecutiveFrom;

    /// <summary>Per row, how many of its leading entries sit in consecutive columns (read as a contiguous dot product).</summary>
    private readonly int[] runLengths;

    /// <summary>
    /// The longer rows that are no mirrors, copied flat: row g's entries at <see cref="generalOffsets"/>[g] … [g + 1]
    /// of the column and value arrays, the first <see cref="generalRuns"/>[g] of them in consecutive columns.
    /// </summary>
    private readonly int[] generalOffsets;
    private readonly int[] generalRuns;
    private readonly int[] generalColumns;
    private readonly double[] generalValues;

    /// <summary>Per mirror h of a longer row, the index (among the rows that are no mirrors) of the row it mirrors.</summary>
    private readonly int[] mirrorOf;

    /// <summary>Per such mirror, the entries where it differs from the negated row (the sums of the two values).</summary>
    private readonly int[] correctionOffsets;
    private readonly int[] correctionColumns;
    private readonly double[] correctionValues;


    public RowSweep(SparseRows rows, ReadOnlySpan<double> inverseNorms)
    {
        this.rows = rows;
        p = rows.RowCount;
        runLengths = new int[p];
        for (int j = 0; j < p; j++)
        {
            var cols = rows.ColumnsOf(j);
            int run = cols.Length > 0 ? 1 : 0;
            while (run < cols.Length && cols[run] == cols[0] + run)
            {
                run++;
            }

            runLengths[j] = run;
        }

        // Pair each row with an earlier unmatched row it mirrors; -1 where none.
        var mirrorOfRow = new int[p];
        var correctionFrom = new int[p];
        Array.Fill(mirrorOfRow, -1);
        var isFirst = new bool[p];
        var openPairs = new Dictionary<(int, int, double, double), int>();
        var openLong = new Dictionary<(int, int, int, double), List<int>>();
        for (int j = 0; j < p; j++)
        {
            var cols = rows.ColumnsOf(j);
            var vals = rows.ValuesOf(j);
            if (cols.Length is 1 or 2)
            {
                var key = (cols[0], cols[^1], vals[0], cols.Length == 2 ? vals[1] : 0.0);
                var mirrorKey = (cols[0], cols[^1], -vals[0], cols.Length == 2 ? -vals[1] : 0.0);
                if (openPairs.Remove(mirrorKey, out int first))
                {
                    mirrorOfRow[j] = first;
                    isFirst[first] = true;
                }
                else
                {
                    openPairs.TryAdd(key, j);
                }
            }
            else if (cols.Length > 2)
            {
                var key = (cols.Length, cols[0], cols[^1], Math.Abs(vals[0]));
                if (openLong.TryGetValue(key, out var open))
                {
                    for (int i = 0; i < open.Count; i++)
                    {
                        int mirrored = NegatedPrefix(open[i], j);
                        if (mirrored >= Math.Max(MinimumMirroredEntries, cols.Length / 2))
                        {
                            mirrorOfRow[j] = open[i];
                            correctionFrom[j] = mirrored;
                            isFirst[open[i]] = true;
                            open.RemoveAt(i);
                            break;
                        }
                    }
                }

                if (mirrorOfRow[j] < 0)
                {
                    if (open is null)
                    {
                        openLong[key] = open = [];
                    }

                    open.Add(j);
                }
            }
        }

        // Positions.
        Order = new int[p];
        Position = new int[p];
        int next = 0;
        void Place(int row)
        {
            Position[row] = next;
            Order[next++] = row;
        }

        bool IsPair(int j) => rows.ColumnsOf(j).Length is 1 or 2;
        var firsts = Enumerable.Range(0, p).Where(j => IsPair(j) && isFirst[j]).ToArray();
        var mirrorAt = new int[p];
        for (int j = 0; j < p; j++)
        {
            if (mirrorOfRow[j] >= 0)
            {
                mirrorAt[mirrorOfRow[j]] = j;
            }
        }

        foreach (int j in firsts)
        {
            Place(j);
        }

        mirroredPairs = next;
        foreach (int j in firsts)
        {
            Place(mirrorAt[j]);
        }

        for (int j = 0; j < p; j++)
        {
            if (IsPair(j) && !isFirst[j] && mirrorOfRow[j] < 0)
            {
                Place(j);
            }
        }

        pairCount = next;
        for (int j = 0; j < p; j++)
        {
            if (!IsPair(j) && mirrorOfRow[j] < 0)
            {
                Place(j);
            }
        }

        primaryCount = next - pairCount;
        var longMirrors = Enumerable.Range(pairCount, primaryCount).Select(k => Order[k]).Where(j => isFirst[j]).Select(j => mirrorAt[j]).ToArray();
        foreach (int j in longMirrors)
        {
            Place(j);
        }

        // Pair rows, scaled.
        firstColumns = new int[pairCount];
        secondColumns = new int[pairCount];
        firstValues = new double[pairCount];
        secondValues = new double[pairCount];
        for (int k = 0; k < pairCount; k++)
        {
            int j = Order[k];
            var cols = rows.ColumnsOf(j);
            var vals = rows.ValuesOf(j);
            firstColumns[k] = cols[0];
            firstValues[k] = vals[0] * inverseNorms[j];
            secondColumns[k] = cols[^1];
            secondValues[k] = cols.Length == 2 ? vals[1] * inverseNorms[j] : 0;
        }

        consecutiveFrom = new bool[pairCount];
        for (int k = 0; k + 4 <= pairCount; k++)
        {
            consecutiveFrom[k] = true;
            for (int e = 1; e < 4; e++)
            {
                consecutiveFrom[k] &= firstColumns[k + e] == firstColumns[k] + e && secondColumns[k + e] == secondColumns[k] + e;
            }
        }

        // Longer rows that are no mirrors, flat. A row's run of consecutive columns is padded with zeros to a multiple
        // of four where x has the columns (entries of the row that fall inside the padding move into it), so every
        // dot product over runs is whole vectors.
        var flatColumns = new List<int>();
        var flatValues = new List<double>();
        generalOffsets = new int[primaryCount + 1];
        generalRuns = new int[primaryCount];
        for (int g = 0; g < primaryCount; g++)
        {
            int j = Order[pairCount + g];
            var cols = rows.ColumnsOf(j);
            var vals = rows.ValuesOf(j);
            int start = cols[0];
            int run = runLengths[j];
            int padded = (run + 3) & ~3;
            if (start + padded > rows.ColumnCount)
            {
                padded = run;
            }

            var dense = new double[padded];
            int e = 0;
            for (; e < cols.Length && cols[e] < start + padded; e++)
            {
                dense[cols[e] - start] = vals[e];
            }

            for (int c = 0; c < padded; c++)
            {
                flatColumns.Add(start + c);
                flatValues.Add(dense[c]);
            }

            for (; e < cols.Length; e++)
            {
                flatColumns.Add(cols[e]);
                flatValues.Add(vals[e]);
            }

            generalRuns[g] = padded;
            generalOffsets[g + 1] = flatColumns.Count;
        }

        generalColumns = [.. flatColumns];
        generalValues = [.. flatValues];

        // Their mirrors: what they add to the negated row.
        mirrorOf = new int[longMirrors.Length];
        correctionOffsets = new int[longMirrors.Length + 1];
        var columns = new List<int>();
        var values = new List<double>();
        for (int h = 0; h < longMirrors.Length; h++)
        {
            int j = longMirrors[h];
            int first = mirrorOfRow[j];
            mirrorOf[h] = Position[first] - pairCount;
            var cols = rows.ColumnsOf(j);
            var mine = rows.ValuesOf(j);
            var theirs = rows.ValuesOf(first);
            for (int e = correctionFrom[j]; e < cols.Length; e++)
            {
                double sum = mine[e] + theirs[e];
                if (sum != 0)
                {
                    columns.Add(cols[e]);
                    values.Add(sum);
                }
            }

            correctionOffsets[h + 1] = columns.Count;
        }

        correctionColumns = [.. columns];
        correctionValues = [.. values];

        InverseNormsByPosition = new double[p];
        NormsByPosition = new double[p];
        for (int k = 0; k < p; k++)
        {
            InverseNormsByPosition[k] = inverseNorms[Order[k]];
            NormsByPosition[k] = 1 / inverseNorms[Order[k]];
        }
    }

    /// <summary>The rows in the order a pass reads them.</summary>
    public int[] Order { get; }

    /// <summary>Each row's place in <see cref="Order"/>.</summary>
    public int[] Position { get; }

    /// <summary>‖n_j‖ by position.</summary>
    public double[] NormsByPosition { get; }

    /// <summary>1/‖n_j‖ by position.</summary>
    public double[] InverseNormsByPosition { get; }

    /// <summary>Rows whose value a pass takes from the row they mirror.</summary>
    public int MirrorCount => mirroredPairs + mirrorOf.Length;

    public long Bytes =>
        (sizeof(int) * ((4L * p) + (2L * pairCount) + generalOffsets.Length + generalRuns.Length + generalColumns.Length + mirrorOf.Length + correctionOffsets.Length + correctionColumns.Length))
        + (sizeof(double) * ((2L * pairCount) + generalValues.Length + correctionValues.Length + (2L * p))) + pairCount;

    /// <summary>values[k] = n_jᵀx/‖n_j‖ for the row j at every position k.</summary>
    public void Values(double* x, double* values)
    {
        fixed (double* v0 = firstValues, v1 = secondValues, inverseNorms = InverseNormsByPosition, correction = correctionValues)
        fixed (int* c0 = firstColumns, c1 = secondColumns, mirrored = mirrorOf, correctionAt = correctionOffsets, correctionColumn = correctionColumns)
        {
            int t = mirroredPairs;
            PairValues(x, v0, c0, v1, c1, values, 0, t, t);
            PairValues(x, v0, c0, v1, c1, values, 2 * t, pairCount, 0);

            // Longer rows: those that are no mirrors four at a time, then each mirror from its row; both then scaled.
            double* general = values + pairCount;
            for (int g = 0; g < primaryCount; g += 4)
            {
                GeneralRowValues(g, Math.Min(4, primaryCount - g), x, general + g);
            }

            double* mirrors = general + primaryCount;
            for (int h = 0; h < mirrorOf.Length; h++)
            {
                double sum = -general[mirrored[h]];
                for (int e = correctionAt[h]; e < correctionAt[h + 1]; e++)
                {
                    sum += correction[e] * x[correctionColumn[e]];
                }

                mirrors[h] = sum;
            }

            int k = pairCount;
            for (; k + 4 <= p; k += 4)
            {
                Vector256.Store(Vector256.Load(values + k) * Vector256.Load(inverseNorms + k), values + k);
            }

            for (; k < p; k++)
            {
                values[k] *= inverseNorms[k];
            }
        }
    }

    /// <summary>n_jᵀx for row <paramref name="row"/>: the leading run of consecutive columns as a dense dot product, the rest gathered.</summary>
    public double RowDot(int row, double* x)
    {
        var columns = rows.ColumnsOf(row);
        var values = rows.ValuesOf(row);
        int run = runLengths[row];
        fixed (int* cp = columns)
        fixed (double* vp = values)
        {
            double sum = run > 0 ? Dot(vp, x + cp[0], run) : 0;
            return sum + GatherDot(x, cp + run, vp + run, columns.Length - run);
        }
    }

    /// <summary>
    /// The scaled values of the rows with one or two entries at positions [from, to), four at a time (loaded where their
    /// columns run on, gathered otherwise); with
    /// <paramref name="mirrorOffset"/> &gt; 0, the negated value also goes to the mirror that many positions on.
    /// </summary>
    private void PairValues(double* x, double* v0, int* c0, double* v1, int* c1, double* values, int from, int to, int mirrorOffset)
    {
        int k = from;
        if (Avx2.IsSupported && Fma.IsSupported)
        {
            fixed (bool* consecutive = consecutiveFrom)
            {
                for (; k + 4 <= to; k += 4)
                {
                    var first = consecutive[k] ? Vector256.Load(x + c0[k]) : Avx2.GatherVector256(x, Vector128.Load(c0 + k), 8);
                    var second = consecutive[k] ? Vector256.Load(x + c1[k]) : Avx2.GatherVector256(x, Vector128.Load(c1 + k), 8);
                    var value = Fma.MultiplyAdd(Vector256.Load(v0 + k), first, Vector256.Load(v1 + k) * second);
                    Vector256.Store(value, values + k);
                    if (mirrorOffset > 0)
                    {
                        Vector256.Store(-value, values + k + mirrorOffset);
                    }
                }
            }
        }

        for (; k < to; k++)
        {
            double value = (v0[k] * x[c0[k]]) + (v1[k] * x[c1[k]]);
            values[k] = value;
            if (mirrorOffset > 0)
            {
                values[k + mirrorOffset] = -value;
            }
        }
    }

    /// <summary>
    /// n_jᵀx for the longer rows g … g + count − 1 that are no mirrors (count ≤ 4): when all four runs start in the same
    /// column (an output limit's rows of one stage, or of two neighbouring stages), their common length is read in one
    /// pass over x with four sums; what each row has beyond it is added row by row.
    /// </summary>
    private void GeneralRowValues(int g, int count, double* x, double* values)
    {
        fixed (int* offsets = generalOffsets, runs = generalRuns, columns = generalColumns)
        fixed (double* entries = generalValues)
        {
            int common = 0;
            if (count == 4)
            {
                int start = columns[offsets[g]];
                bool shared = runs[g] > 0 && runs[g + 1] > 0 && runs[g + 2] > 0 && runs[g + 3] > 0
                    && columns[offsets[g + 1]] == start && columns[offsets[g + 2]] == start && columns[offsets[g + 3]] == start;
                if (shared)
                {
                    common = Math.Min(Math.Min(runs[g], runs[g + 1]), Math.Min(runs[g + 2], runs[g + 3])) & ~3;
                    double* e0 = entries + offsets[g];
                    double* e1 = entries + offsets[g + 1];
                    double* e2 = entries + offsets[g + 2];
                    double* e3 = entries + offsets[g + 3];
                    Vector256.Store(FourDots(e0, e1, e2, e3, x + start, common), values);
                }
            }

            for (int r = 0; r < count; r++)
            {
                int first = offsets[g + r];
                int from = first + common;
                int runEnd = first + runs[g + r];
                int end = offsets[g + r + 1];
                double sum = common > 0 ? values[r] : 0;
                if (from < runEnd)
                {
                    sum += Dot(entries + from, x + columns[first] + common, runEnd - from);
                    from = runEnd;
                }

                for (int e = from; e < end; e++)
                {
                    sum += entries[e] * x[columns[e]];
                }

                values[r] = sum;
            }
        }
    }

    /// <summary>
    /// How many leading entries row b has as row a's negated, when both have the same columns; 0 otherwise.
    /// </summary>
    private int NegatedPrefix(int a, int b)
    {
        var ca = rows.ColumnsOf(a);
        var cb = rows.ColumnsOf(b);
        if (!ca.SequenceEqual(cb))
        {
            return 0;
        }

        var va = rows.ValuesOf(a);
        var vb = rows.ValuesOf(b);
        int e = 0;
        while (e < va.Length && vb[e] == -va[e])
        {
            e++;
        }

        return e;
    }
}
