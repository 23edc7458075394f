using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;

namespace Lookahead.Core.Planning;

/// <summary>
/// The row passes of <see cref="StagewiseLimitRows"/> when every input has both bounds and both rate limits and every
/// softly limited output both sides (the demo, and most plants as configured): then each block of rows lines up with
/// the inputs or outputs it limits, one to one, so the passes are straight loops over contiguous arrays — vectorised,
/// with no per-row index lists. The general passes remain for partly limited models; a test holds the two to each
/// other.
/// </summary>
internal sealed unsafe partial class StagewiseLimitRows
{
    /// <summary>Limits repeated over the horizon (u: N·m, outputs: N·ns), so a block's limit is read like its values.</summary>
    private readonly double[]? repeated;

    /// <summary>Whether the contiguous passes apply (every limit present on both sides; see the class remarks).</summary>
    public bool IsContiguous => repeated is not null;

    private static double[]? Repeated(bool allowContiguous, int horizon, double[] inputMin, double[] inputMax, double[] rateMin, double[] rateMax, double[] softMin, double[] softMax)
    {
        static bool AllFinite(double[] values) => Array.TrueForAll(values, double.IsFinite);
        if (!allowContiguous || !(AllFinite(inputMin) && AllFinite(inputMax) && AllFinite(rateMin) && AllFinite(rateMax) && AllFinite(softMin) && AllFinite(softMax)))
        {
            return null;
        }

        int nm = horizon * inputMin.Length;
        int ny = horizon * softMin.Length;
        var result = new double[(4 * nm) + (2 * ny)];
        for (int k = 0; k < horizon; k++)
        {
            inputMin.CopyTo(result, k * inputMin.Length);
            inputMax.CopyTo(result, nm + (k * inputMin.Length));
            rateMin.CopyTo(result, (2 * nm) + (k * inputMin.Length));
            rateMax.CopyTo(result, (3 * nm) + (k * inputMin.Length));
            softMin.CopyTo(result, (4 * nm) + (k * softMin.Length));
            softMax.CopyTo(result, (4 * nm) + ny + (k * softMin.Length));
        }

        return result;
    }

    private void ValuesContiguous(InteriorPointWorkspace ws, in LimitRowLayout layout, ReadOnlySpan<double> previousInput)
    {
        int nm = horizon * m;
        int ny = horizon * ns;
        int first = layout.FirstRateStep * m;
        fixed (double* limits = repeated)
        {
            double* value = Pointer(ws.RowValue);
            double* u = Pointer(ws.Inputs);
            double* y = Pointer(ws.SoftOutputs) + ns;
            double* eps = Pointer(ws.Slacks);
            double* low = value + layout.RateLow - first;
            double* high = value + layout.RateHigh - first;
            int j = 0;
            for (; j + 4 <= nm; j += 4)
            {
                var uj = Vector256.Load(u + j);
                Vector256.Store(uj - Vector256.Load(limits + j), value + j);
                Vector256.Store(Vector256.Load(limits + nm + j) - uj, value + nm + j);
            }

            for (; j < nm; j++)
            {
                value[j] = u[j] - limits[j];
                value[nm + j] = limits[nm + j] - u[j];
            }

            // Δu_0 rows from u_{−1}, only when they are in force (then the block starts at k = 0, first = 0).
            for (int i = 0; first == 0 && i < m; i++)
            {
                double move = u[i] - previousInput[i];
                low[i] = move - limits[(2 * nm) + i];
                high[i] = limits[(3 * nm) + i] - move;
            }

            j = m;
            for (; j + 4 <= nm; j += 4)
            {
                var move = Vector256.Load(u + j) - Vector256.Load(u + j - m);
                Vector256.Store(move - Vector256.Load(limits + (2 * nm) + j), low + j);
                Vector256.Store(Vector256.Load(limits + (3 * nm) + j) - move, high + j);
            }

            for (; j < nm; j++)
            {
                double move = u[j] - u[j - m];
                low[j] = move - limits[(2 * nm) + j];
                high[j] = limits[(3 * nm) + j] - move;
            }

            double* outputLowRows = value + layout.OutputLow;
            double* outputHighRows = value + layout.OutputHigh;
            double* softLow = limits + (4 * nm);
            double* softHigh = softLow + ny;
            for (int k = 0; k < horizon; k++)
            {
                for (int t = 0; t < ns; t++)
                {
                    int q = (k * ns) + t;
                    outputLowRows[q] = y[q] + eps[t] - softLow[q];
                    outputHighRows[q] = softHigh[q] + eps[t] - y[q];
                }
            }

            double* slackRows = value + layout.Slack;
            for (int t = 0; t < ns; t++)
            {
                slackRows[t] = eps[t];
            }
        }
    }

    private void StepsContiguous(InteriorPointWorkspace ws, in LimitRowLayout layout)
    {
        int nm = horizon * m;
        int first = layout.FirstRateStep * m;
        double* step = Pointer(ws.StepRow);
        double* du = Pointer(ws.StepInputs);
        double* dy = Pointer(ws.StepSoftOutputs) + ns;
        double* de = Pointer(ws.StepSlacks);
        double* low = step + layout.RateLow - first;
        double* high = step + layout.RateHigh - first;
        int j = 0;
        for (; j + 4 <= nm; j += 4)
        {
            var d = Vector256.Load(du + j);
            Vector256.Store(d, step + j);
            Vector256.Store(-d, step + nm + j);
        }

        for (; j < nm; j++)
        {
            step[j] = du[j];
            step[nm + j] = -du[j];
        }

        for (int i = 0; first == 0 && i < m; i++)
        {
            low[i] = du[i];
            high[i] = -du[i];
        }

        j = m;
        for (; j + 4 <= nm; j += 4)
        {
            var move = Vector256.Load(du + j) - Vector256.Load(du + j - m);
            Vector256.Store(move, low + j);
            Vector256.Store(-move, high + j);
        }

        for (; j < nm; j++)
        {
            double move = du[j] - du[j - m];
            low[j] = move;
            high[j] = -move;
        }

        double* outputLowRows = step + layout.OutputLow;
        double* outputHighRows = step + layout.OutputHigh;
        for (int k = 0; k < horizon; k++)
        {
            for (int t = 0; t < ns; t++)
            {
                int q = (k * ns) + t;
                outputLowRows[q] = dy[q] + de[t];
                outputHighRows[q] = de[t] - dy[q];
            }
        }

        double* slackRows = step + layout.Slack;
        for (int t = 0; t < ns; t++)
        {
            slackRows[t] = de[t];
        }
    }

    private void SubtractTransposedContiguous(InteriorPointWorkspace ws, in LimitRowLayout layout, double[] multipliers, ReadOnlySpan<double> cs)
    {
        int nm = horizon * m;
        int first = layout.FirstRateStep * m;
        double* lambda = Pointer(multipliers);
        double* gu = Pointer(ws.InputGradient);
        double* gx = Pointer(ws.StateGradient) + n;
        double* ge = Pointer(ws.SlackGradient);
        double* low = lambda + layout.RateLow - first;
        double* high = lambda + layout.RateHigh - first;

        // Bounds pull u_{k,i} by λ^hi − λ^lo; a rate row on Δu_{k,i} pulls u_{k,i} and, the other way, u_{k−1,i}.
        int j = 0;
        for (; j + 4 <= nm; j += 4)
        {
            Vector256.Store(Vector256.Load(gu + j) - Vector256.Load(lambda + j) + Vector256.Load(lambda + nm + j), gu + j);
        }

        for (; j < nm; j++)
        {
            gu[j] += lambda[nm + j] - lambda[j];
        }

        for (int i = 0; first == 0 && i < m; i++)
        {
            gu[i] -= low[i] - high[i];
        }

        for (j = m; j < nm; j++)
        {
            double pull = low[j] - high[j];
            gu[j] -= pull;
            gu[j - m] += pull;
        }

        if (ns == 0)
        {
            return;
        }

        // Output rows: x_k gets −c_s(λ^lo − λ^hi), ε_s gets −(λ^lo + λ^hi).
        double* outputLow = lambda + layout.OutputLow;
        double* outputHigh = lambda + layout.OutputHigh;
        fixed (double* c = cs)
        {
            for (int k = 0; k < horizon; k++)
            {
                double* gk = gx + (k * n);
                for (int t = 0; t < ns; t++)
                {
                    int q = (k * ns) + t;
                    double pull = outputLow[q] - outputHigh[q];
                    ge[t] -= outputLow[q] + outputHigh[q];
                    double* ct = c + (t * n);
                    for (int i = 0; i < n; i++)
                    {
                        gk[i] -= ct[i] * pull;
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

    private void SumBarriersContiguous(InteriorPointWorkspace ws, in LimitRowLayout layout)
    {
        int nm = horizon * m;
        int first = layout.FirstRateStep * m;
        double* d = Pointer(ws.Barrier);
        double* du = Pointer(ws.InputBarrier);
        double* dd = Pointer(ws.RateBarrier);
        double* sum = Pointer(ws.OutputBarrierSum);
        double* difference = Pointer(ws.OutputBarrierDifference);
        double* low = d + layout.RateLow - first;
        double* high = d + layout.RateHigh - first;
        int j = 0;
        for (; j + 4 <= nm; j += 4)
        {
            Vector256.Store(Vector256.Load(d + j) + Vector256.Load(d + nm + j), du + j);
        }

        for (; j < nm; j++)
        {
            du[j] = d[j] + d[nm + j];
        }

        for (j = 0; j < first; j++)
        {
            dd[j] = 0;
        }

        for (j = first; j < nm; j++)
        {
            dd[j] = low[j] + high[j];
        }

        for (int t = 0; t < ns; t++)
        {
            sum[t] = 0;
            difference[t] = 0;
        }

        double* outputLow = d + layout.OutputLow;
        double* outputHigh = d + layout.OutputHigh;
        for (int q = 0; q < horizon * ns; q++)
        {
            sum[ns + q] = outputLow[q] + outputHigh[q];
            difference[ns + q] = outputLow[q] - outputHigh[q];
        }

        for (int t = 0; t < ns; t++)
        {
            ws.SlackBarrier[t] = d[layout.Slack + t];
        }
    }
}
