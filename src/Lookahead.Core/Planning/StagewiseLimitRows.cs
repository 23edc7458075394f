using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using Lookahead.Core.Optimization;

namespace Lookahead.Core.Planning;

/// <summary>
/// The limits of a plan as rows g_i(z) ≥ 0 over the stagewise variables (u_k, x_k, ε), in the order of
/// <see cref="LimitRowLayout"/>:
/// <list type="bullet">
/// <item>u_{k,i} − umin_i and umax_i − u_{k,i};</item>
/// <item>Δu_{k,i} − dmin_i and dmax_i − Δu_{k,i} with Δu_{k,i} = u_{k,i} − u_{k−1,i} (k = 0 from u_{−1}, when in force);</item>
/// <item>y_{k,s} + ε_s − ymin_s and ymax_s + ε_s − y_{k,s} for k = 1 … N, y_{k,s} = c_sᵀx_k;</item>
/// <item>ε_s.</item>
/// </list>
/// It evaluates the rows, their change along a step, Gᵀ times a multiplier vector and the barrier weights summed per
/// variable — the only places the interior-point method touches the rows one by one. Immutable.
/// </summary>
internal sealed unsafe partial class StagewiseLimitRows
{
    private readonly int n;
    private readonly int m;
    private readonly int ns;
    private readonly int horizon;
    private readonly double[] inputMin;
    private readonly double[] inputMax;
    private readonly double[] rateMin;
    private readonly double[] rateMax;
    private readonly double[] softMin;
    private readonly double[] softMax;
    private readonly int[] inputLow;
    private readonly int[] inputHigh;
    private readonly int[] rateLow;
    private readonly int[] rateHigh;
    private readonly int[] outputLow;
    private readonly int[] outputHigh;
    private readonly int[] softOutputs;

    /// <param name="softOutputs">The outputs with a soft limit, in slack order.</param>
    /// <param name="softMin">ymin of each soft output (slack order, −∞ when absent).</param>
    /// <param name="softMax">ymax of each soft output (slack order, +∞ when absent).</param>
    /// <param name="allowContiguous">Use the contiguous passes when every limit is present (false only to compare the two in tests).</param>
    public StagewiseLimitRows(int horizon, int stateCount, double[] inputMin, double[] inputMax, double[] rateMin, double[] rateMax, int[] softOutputs, double[] softMin, double[] softMax, bool allowContiguous = true)
    {
        n = stateCount;
        m = inputMin.Length;
        ns = softMin.Length;
        this.horizon = horizon;
        this.inputMin = inputMin;
        this.inputMax = inputMax;
        this.rateMin = rateMin;
        this.rateMax = rateMax;
        this.softMin = softMin;
        this.softMax = softMax;
        this.softOutputs = softOutputs;
        inputLow = Enumerable.Range(0, m).Where(i => double.IsFinite(inputMin[i])).ToArray();
        inputHigh = Enumerable.Range(0, m).Where(i => double.IsFinite(inputMax[i])).ToArray();
        rateLow = Enumerable.Range(0, m).Where(i => double.IsFinite(rateMin[i])).ToArray();
        rateHigh = Enumerable.Range(0, m).Where(i => double.IsFinite(rateMax[i])).ToArray();
        outputLow = Enumerable.Range(0, ns).Where(t => double.IsFinite(softMin[t])).ToArray();
        outputHigh = Enumerable.Range(0, ns).Where(t => double.IsFinite(softMax[t])).ToArray();
        MaxRows = (2 * horizon * m) + (2 * horizon * m) + (2 * horizon * ns) + ns;
        Scale = 1 + new[] { inputMin, inputMax, rateMin, rateMax, softMin, softMax }
            .SelectMany(v => v).Where(double.IsFinite).Select(Math.Abs).DefaultIfEmpty(0).Max();
        repeated = Repeated(allowContiguous, horizon, inputMin, inputMax, rateMin, rateMax, softMin, softMax);
    }

    /// <summary>Most rows a request can have.</summary>
    public int MaxRows { get; }

    /// <summary>1 + the largest finite limit, the scale of the rows' values.</summary>
    public double Scale { get; }

    public LimitRowLayout Layout(bool firstRateRows) =>
        new(horizon, inputLow.Length, inputHigh.Length, rateLow.Length, rateHigh.Length, outputLow.Length, outputHigh.Length, ns, firstRateRows);

    /// <summary>Whether input <paramref name="input"/> cannot satisfy both its window and its first rate limit from u_{−1} (the active-set path's test and tolerance).</summary>
    public bool IsFirstMoveUnreachable(ReadOnlySpan<double> previousInput, int input)
    {
        double low = Math.Max(inputMin[input], previousInput[input] + rateMin[input]);
        double high = Math.Min(inputMax[input], previousInput[input] + rateMax[input]);
        return low > high + (DualActiveSetSolver.FeasibilityTolerance * (1 + Math.Abs(high)));
    }

    /// <summary>Puts each u_{k,i} back into [umin_i, umax_i].</summary>
    public void ClipToInputLimits(Span<double> inputs)
    {
        for (int k = 0; k < horizon; k++)
        {
            for (int i = 0; i < m; i++)
            {
                ref double v = ref inputs[(k * m) + i];
                v = Math.Clamp(v, inputMin[i], inputMax[i]);
            }
        }
    }

    /// <summary>value_i = g_i(z) at the workspace's point (Inputs, SoftOutputs, Slacks).</summary>
    public void Values(InteriorPointWorkspace ws, in LimitRowLayout layout, ReadOnlySpan<double> previousInput)
    {
        if (repeated is not null)
        {
            ValuesContiguous(ws, layout, previousInput);
            return;
        }

        double* value = Pointer(ws.RowValue);
        double* u = Pointer(ws.Inputs);
        double* y = Pointer(ws.SoftOutputs);
        double* eps = Pointer(ws.Slacks);
        int row = 0;
        for (int k = 0; k < horizon; k++)
        {
            double* uk = u + (k * m);
            foreach (int i in inputLow)
            {
                value[row++] = uk[i] - inputMin[i];
            }
        }

        for (int k = 0; k < horizon; k++)
        {
            double* uk = u + (k * m);
            foreach (int i in inputHigh)
            {
                value[row++] = inputMax[i] - uk[i];
            }
        }

        for (int pass = 0; pass < 2; pass++)
        {
            var list = pass == 0 ? rateLow : rateHigh;
            var limit = pass == 0 ? rateMin : rateMax;
            double sign = pass == 0 ? 1 : -1;
            for (int k = layout.FirstRateStep; k < horizon; k++)
            {
                double* uk = u + (k * m);
                foreach (int i in list)
                {
                    double before = k > 0 ? uk[i - m] : previousInput[i];
                    value[row++] = sign * (uk[i] - before - limit[i]);
                }
            }
        }

        for (int k = 1; k <= horizon; k++)
        {
            double* yk = y + (k * ns);
            foreach (int t in outputLow)
            {
                value[row++] = yk[t] + eps[t] - softMin[t];
            }
        }

        for (int k = 1; k <= horizon; k++)
        {
            double* yk = y + (k * ns);
            foreach (int t in outputHigh)
            {
                value[row++] = softMax[t] + eps[t] - yk[t];
            }
        }

        for (int t = 0; t < ns; t++)
        {
            value[row++] = eps[t];
        }
    }

    /// <summary>StepRow_i = change of g_i along the step (StepInputs, StepSoftOutputs, StepSlacks); the limits drop out.</summary>
    public void Steps(InteriorPointWorkspace ws, in LimitRowLayout layout)
    {
        if (repeated is not null)
        {
            StepsContiguous(ws, layout);
            return;
        }

        double* step = Pointer(ws.StepRow);
        double* du = Pointer(ws.StepInputs);
        double* dy = Pointer(ws.StepSoftOutputs);
        double* de = Pointer(ws.StepSlacks);
        int row = 0;
        for (int k = 0; k < horizon; k++)
        {
            double* uk = du + (k * m);
            foreach (int i in inputLow)
            {
                step[row++] = uk[i];
            }
        }

        for (int k = 0; k < horizon; k++)
        {
            double* uk = du + (k * m);
            foreach (int i in inputHigh)
            {
                step[row++] = -uk[i];
            }
        }

        for (int pass = 0; pass < 2; pass++)
        {
            var list = pass == 0 ? rateLow : rateHigh;
            double sign = pass == 0 ? 1 : -1;
            for (int k = layout.FirstRateStep; k < horizon; k++)
            {
                double* uk = du + (k * m);
                foreach (int i in list)
                {
                    step[row++] = sign * (k > 0 ? uk[i] - uk[i - m] : uk[i]);
                }
            }
        }

        for (int k = 1; k <= horizon; k++)
        {
            double* yk = dy + (k * ns);
            foreach (int t in outputLow)
            {
                step[row++] = yk[t] + de[t];
            }
        }

        for (int k = 1; k <= horizon; k++)
        {
            double* yk = dy + (k * ns);
            foreach (int t in outputHigh)
            {
                step[row++] = de[t] - yk[t];
            }
        }

        for (int t = 0; t < ns; t++)
        {
            step[row++] = de[t];
        }
    }

    /// <summary>
    /// InputGradient, StateGradient, SlackGradient −= Gᵀ<paramref name="multipliers"/>: the rows' pull on u_k, on x_k
    /// (through c_s) and on ε.
    /// </summary>
    public void SubtractTransposed(InteriorPointWorkspace ws, in LimitRowLayout layout, double[] multipliers, ReadOnlySpan<double> cs)
    {
        if (repeated is not null)
        {
            SubtractTransposedContiguous(ws, layout, multipliers, cs);
            return;
        }

        double* lambda = Pointer(multipliers);
        double* gu = Pointer(ws.InputGradient);
        double* gx = Pointer(ws.StateGradient);
        double* ge = Pointer(ws.SlackGradient);
        double* pull = Pointer(ws.Coefficients);
        int row = 0;
        for (int k = 0; k < horizon; k++)
        {
            double* gk = gu + (k * m);
            foreach (int i in inputLow)
            {
                gk[i] -= lambda[row++];
            }
        }

        for (int k = 0; k < horizon; k++)
        {
            double* gk = gu + (k * m);
            foreach (int i in inputHigh)
            {
                gk[i] += lambda[row++];
            }
        }

        for (int pass = 0; pass < 2; pass++)
        {
            var list = pass == 0 ? rateLow : rateHigh;
            double sign = pass == 0 ? 1 : -1;
            for (int k = layout.FirstRateStep; k < horizon; k++)
            {
                double* gk = gu + (k * m);
                foreach (int i in list)
                {
                    double v = sign * lambda[row++];
                    gk[i] -= v;
                    if (k > 0)
                    {
                        gk[i - m] += v;
                    }
                }
            }
        }

        if (ns == 0)
        {
            return;
        }

        // Output rows: x_k gets −c_s(λ^lo − λ^hi), ε_s gets −(λ^lo + λ^hi).
        int lowCount = outputLow.Length;
        int highCount = outputHigh.Length;
        fixed (double* c = cs)
        {
            for (int k = 1; k <= horizon; k++)
            {
                for (int t = 0; t < ns; t++)
                {
                    pull[t] = 0;
                }

                double* low = lambda + layout.OutputLow + ((k - 1) * lowCount);
                for (int q = 0; q < lowCount; q++)
                {
                    int t = outputLow[q];
                    pull[t] += low[q];
                    ge[t] -= low[q];
                }

                double* high = lambda + layout.OutputHigh + ((k - 1) * highCount);
                for (int q = 0; q < highCount; q++)
                {
                    int t = outputHigh[q];
                    pull[t] -= high[q];
                    ge[t] -= high[q];
                }

                double* gk = gx + (k * n);
                for (int t = 0; t < ns; t++)
                {
                    double v = pull[t];
                    if (v != 0)
                    {
                        double* ct = c + (t * n);
                        for (int i = 0; i < n; i++)
                        {
                            gk[i] -= ct[i] * v;
                        }
                    }
                }
            }
        }

        double* slack = lambda + layout.Slack;
        for (int t = 0; t < ns; t++)
        {
            ge[t] -= slack[t];
        }
    }

    /// <summary>Barrier weights d_i summed per variable: per u_{k,i} (InputBarrier), per Δu_{k,i} (RateBarrier), per (k, s) as d^lo + d^hi and d^lo − d^hi, per ε (SlackBarrier).</summary>
    public void SumBarriers(InteriorPointWorkspace ws, in LimitRowLayout layout)
    {
        if (repeated is not null)
        {
            SumBarriersContiguous(ws, layout);
            return;
        }

        double* d = Pointer(ws.Barrier);
        double* du = Pointer(ws.InputBarrier);
        double* dd = Pointer(ws.RateBarrier);
        double* sum = Pointer(ws.OutputBarrierSum);
        double* difference = Pointer(ws.OutputBarrierDifference);
        new Span<double>(du, horizon * m).Clear();
        new Span<double>(dd, horizon * m).Clear();
        new Span<double>(sum, (horizon + 1) * ns).Clear();
        new Span<double>(difference, (horizon + 1) * ns).Clear();
        int row = 0;
        for (int pass = 0; pass < 2; pass++)
        {
            var list = pass == 0 ? inputLow : inputHigh;
            for (int k = 0; k < horizon; k++)
            {
                double* dk = du + (k * m);
                foreach (int i in list)
                {
                    dk[i] += d[row++];
                }
            }
        }

        for (int pass = 0; pass < 2; pass++)
        {
            var list = pass == 0 ? rateLow : rateHigh;
            for (int k = layout.FirstRateStep; k < horizon; k++)
            {
                double* dk = dd + (k * m);
                foreach (int i in list)
                {
                    dk[i] += d[row++];
                }
            }
        }

        for (int k = 1; k <= horizon; k++)
        {
            foreach (int t in outputLow)
            {
                double v = d[row++];
                sum[(k * ns) + t] += v;
                difference[(k * ns) + t] += v;
            }
        }

        for (int k = 1; k <= horizon; k++)
        {
            foreach (int t in outputHigh)
            {
                double v = d[row++];
                sum[(k * ns) + t] += v;
                difference[(k * ns) + t] -= v;
            }
        }

        for (int t = 0; t < ns; t++)
        {
            ws.SlackBarrier[t] = d[row++];
        }
    }

    /// <summary>
    /// The limits that hold with equality after a solve in <paramref name="ws"/>, judged by complementarity (a row's
    /// multiplier exceeds its slack); the slack bounds are not limits of their own and are left out.
    /// </summary>
    public void ActiveLimits(InteriorPointWorkspace ws, in LimitRowLayout layout, List<ActiveLimit> active)
    {
        var s = ws.RowSlack;
        var lambda = ws.Multiplier;
        bool Active(int row) => lambda[row] > s[row];
        int rows = 0;
        for (int pass = 0; pass < 2; pass++)
        {
            var list = pass == 0 ? inputLow : inputHigh;
            var kind = pass == 0 ? LimitKind.InputMin : LimitKind.InputMax;
            for (int k = 0; k < horizon; k++)
            {
                foreach (int i in list)
                {
                    if (Active(rows++))
                    {
                        active.Add(new ActiveLimit(kind, k, i));
                    }
                }
            }
        }

        for (int pass = 0; pass < 2; pass++)
        {
            var list = pass == 0 ? rateLow : rateHigh;
            var kind = pass == 0 ? LimitKind.InputRateMin : LimitKind.InputRateMax;
            for (int k = layout.FirstRateStep; k < horizon; k++)
            {
                foreach (int i in list)
                {
                    if (Active(rows++))
                    {
                        active.Add(new ActiveLimit(kind, k, i));
                    }
                }
            }
        }

        for (int pass = 0; pass < 2; pass++)
        {
            var list = pass == 0 ? outputLow : outputHigh;
            var kind = pass == 0 ? LimitKind.OutputMin : LimitKind.OutputMax;
            for (int k = 1; k <= horizon; k++)
            {
                foreach (int t in list)
                {
                    if (Active(rows++))
                    {
                        active.Add(new ActiveLimit(kind, k, softOutputs[t]));
                    }
                }
            }
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static double* Pointer(double[] array) => (double*)Unsafe.AsPointer(ref MemoryMarshal.GetArrayDataReference(array));
}
