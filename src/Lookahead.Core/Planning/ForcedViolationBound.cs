using Lookahead.Core.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>
/// A lower bound on the soft-limit violation that every plan respecting the hard limits must have:
/// interval arithmetic over the inputs' reachable windows (input limits intersected with what the rate limits allow
/// from the window one step earlier, and from u_{−1} at k = 0 when those rows are on), propagated through
/// x_{k+1} = Ax_k + Bu_k, gives an interval for each y_{k,j}; the part of it beyond [ymin_j, ymax_j] cannot be avoided.
/// <para>
/// Used to skip a solve: <see cref="SoftLimitPolicy"/> accepts a raised ρ only if the largest slack shrinks below
/// <see cref="SoftLimitPolicy.WorthwhileShrink"/> of its value; when this bound already exceeds that, no plan at any ρ
/// can shrink it so far, so the raise would be refused and is not tried.
/// </para>
/// Immutable; scratch comes from the stack (or the pool for very large models).
/// </summary>
internal sealed class ForcedViolationBound
{
    private readonly int n;
    private readonly int m;
    private readonly int horizon;
    private readonly double[] a;
    private readonly double[] b;
    private readonly double[] cs;
    private readonly double[] softMin;
    private readonly double[] softMax;
    private readonly double[] inputMin;
    private readonly double[] inputMax;
    private readonly double[] rateMin;
    private readonly double[] rateMax;

    /// <param name="cs">Rows of C of the softly limited outputs (ns×n, row-major).</param>
    public ForcedViolationBound(Matrix<double> a, Matrix<double> b, double[] cs, double[] softMin, double[] softMax, int horizon, double[] inputMin, double[] inputMax, double[] rateMin, double[] rateMax)
    {
        n = a.RowCount;
        m = b.ColumnCount;
        this.horizon = horizon;
        this.a = DenseMatrix.RowMajor(a);
        this.b = DenseMatrix.RowMajor(b);
        this.cs = cs;
        this.softMin = softMin;
        this.softMax = softMax;
        this.inputMin = inputMin;
        this.inputMax = inputMax;
        this.rateMin = rateMin;
        this.rateMax = rateMax;
    }

    /// <summary>max over soft outputs j of the least violation max_k dist(y_{k,j}, [ymin_j, ymax_j]) any plan can reach (≥ 0).</summary>
    /// <param name="previousInput">u_{−1}, empty when not given (no k = 0 rate rows then).</param>
    /// <param name="relaxed">Inputs whose k = 0 rate rows are off for this plan (their first move cannot reach its window).</param>
    public double Compute(ReadOnlySpan<double> x0, ReadOnlySpan<double> previousInput, IReadOnlyList<int> relaxed)
    {
        int ns = softMin.Length;
        if (ns == 0)
        {
            return 0;
        }

        int size = 4 * (n + m);
        var rented = StackScratch.Fits(size) ? null : System.Buffers.ArrayPool<double>.Shared.Rent(size);
        Span<double> scratch = rented ?? stackalloc double[size];
        var low = scratch[..n];
        var high = scratch.Slice(n, n);
        var nextLow = scratch.Slice(2 * n, n);
        var nextHigh = scratch.Slice(3 * n, n);
        var inputLow = scratch.Slice(4 * n, m);
        var inputHigh = scratch.Slice((4 * n) + m, m);
        x0.CopyTo(low);
        x0.CopyTo(high);
        double worst = 0;
        for (int k = 0; k < horizon; k++)
        {
            for (int i = 0; i < m; i++)
            {
                double lo = inputMin[i];
                double hi = inputMax[i];
                if (k > 0)
                {
                    lo = Math.Max(lo, inputLow[i] + rateMin[i]);
                    hi = Math.Min(hi, inputHigh[i] + rateMax[i]);
                }
                else if (!previousInput.IsEmpty && !relaxed.Contains(i))
                {
                    lo = Math.Max(lo, previousInput[i] + rateMin[i]);
                    hi = Math.Min(hi, previousInput[i] + rateMax[i]);
                }

                inputLow[i] = lo;
                inputHigh[i] = Math.Max(lo, hi);
            }

            Propagate(a, n, low, high, nextLow, nextHigh, clear: true);
            Propagate(b, m, inputLow, inputHigh, nextLow, nextHigh, clear: false);
            nextLow.CopyTo(low);
            nextHigh.CopyTo(high);
            for (int t = 0; t < ns; t++)
            {
                double yLow = 0;
                double yHigh = 0;
                for (int i = 0; i < n; i++)
                {
                    double c = cs[(t * n) + i];
                    if (c != 0)
                    {
                        yLow += c > 0 ? c * low[i] : c * high[i];
                        yHigh += c > 0 ? c * high[i] : c * low[i];
                    }
                }

                // NaN (∞ − ∞ cannot occur, but an unbounded input gives ±∞) compares false and leaves worst alone.
                worst = Math.Max(worst, Math.Max(yLow - softMax[t], softMin[t] - yHigh));
            }
        }

        if (rented is not null)
        {
            System.Buffers.ArrayPool<double>.Shared.Return(rented);
        }

        return double.IsFinite(worst) ? worst : 0;
    }

    /// <summary>[lo', hi'] (+)= M·[lo, hi] for row-major M (n×columns), skipping zero coefficients so 0·∞ never occurs.</summary>
    private void Propagate(double[] matrix, int columns, ReadOnlySpan<double> low, ReadOnlySpan<double> high, Span<double> resultLow, Span<double> resultHigh, bool clear)
    {
        for (int i = 0; i < n; i++)
        {
            double lo = clear ? 0 : resultLow[i];
            double hi = clear ? 0 : resultHigh[i];
            for (int j = 0; j < columns; j++)
            {
                double c = matrix[(i * columns) + j];
                if (c > 0)
                {
                    lo += c * low[j];
                    hi += c * high[j];
                }
                else if (c < 0)
                {
                    lo += c * high[j];
                    hi += c * low[j];
                }
            }

            resultLow[i] = lo;
            resultHigh[i] = hi;
        }
    }
}
