using System.Numerics;
using System.Runtime.InteropServices;

namespace Lookahead.Core.Planning;

/// <summary>
/// The elementwise parts of a predictor–corrector iteration over the rows (slacks s, multipliers λ, row values g),
/// vectorised: a request has hundreds of rows and each iteration passes over them several times. All spans have the
/// same length; no destination may alias an input unless stated.
/// </summary>
internal static class ComplementarityKernels
{
    /// <summary>inverse = 1/s, barrier = λ/s, shift = λ − λg/s (the predictor's λ̂ for r_c = sλ).</summary>
    public static void Predictor(ReadOnlySpan<double> s, ReadOnlySpan<double> lambda, ReadOnlySpan<double> value, Span<double> inverse, Span<double> barrier, Span<double> shift)
    {
        int i = 0;
        if (Vector.IsHardwareAccelerated)
        {
            var sv = MemoryMarshal.Cast<double, Vector<double>>(s);
            var lv = MemoryMarshal.Cast<double, Vector<double>>(lambda);
            var gv = MemoryMarshal.Cast<double, Vector<double>>(value);
            var iv = MemoryMarshal.Cast<double, Vector<double>>(inverse);
            var bv = MemoryMarshal.Cast<double, Vector<double>>(barrier);
            var hv = MemoryMarshal.Cast<double, Vector<double>>(shift);
            for (int v = 0; v < sv.Length; v++)
            {
                var inv = Vector<double>.One / sv[v];
                var d = lv[v] * inv;
                iv[v] = inv;
                bv[v] = d;
                hv[v] = lv[v] - (d * gv[v]);
            }

            i = sv.Length * Vector<double>.Count;
        }

        for (; i < s.Length; i++)
        {
            double inv = 1 / s[i];
            double d = lambda[i] * inv;
            inverse[i] = inv;
            barrier[i] = d;
            shift[i] = lambda[i] - (d * value[i]);
        }
    }

    /// <summary>
    /// Δs = Δg + g − s and Δλ = −(dΔg) − (λ − λ̂) for a step whose row changes are Δg (the Newton system eliminated to
    /// the primal step; see <see cref="InteriorPointProblem"/>).
    /// </summary>
    public static void Steps(ReadOnlySpan<double> stepRow, ReadOnlySpan<double> value, ReadOnlySpan<double> s, ReadOnlySpan<double> barrier, ReadOnlySpan<double> lambda, ReadOnlySpan<double> shift, Span<double> ds, Span<double> dl)
    {
        int i = 0;
        if (Vector.IsHardwareAccelerated)
        {
            var pv = MemoryMarshal.Cast<double, Vector<double>>(stepRow);
            var gv = MemoryMarshal.Cast<double, Vector<double>>(value);
            var sv = MemoryMarshal.Cast<double, Vector<double>>(s);
            var bv = MemoryMarshal.Cast<double, Vector<double>>(barrier);
            var lv = MemoryMarshal.Cast<double, Vector<double>>(lambda);
            var hv = MemoryMarshal.Cast<double, Vector<double>>(shift);
            var dsv = MemoryMarshal.Cast<double, Vector<double>>(ds);
            var dlv = MemoryMarshal.Cast<double, Vector<double>>(dl);
            for (int v = 0; v < pv.Length; v++)
            {
                dsv[v] = pv[v] + gv[v] - sv[v];
                dlv[v] = hv[v] - lv[v] - (bv[v] * pv[v]);
            }

            i = pv.Length * Vector<double>.Count;
        }

        for (; i < s.Length; i++)
        {
            ds[i] = stepRow[i] + value[i] - s[i];
            dl[i] = shift[i] - lambda[i] - (barrier[i] * stepRow[i]);
        }
    }

    /// <summary>Largest α ≤ <paramref name="cap"/> with s + αΔs ≥ 0 and λ + αΔλ ≥ 0.</summary>
    public static double MaxStep(ReadOnlySpan<double> s, ReadOnlySpan<double> lambda, ReadOnlySpan<double> ds, ReadOnlySpan<double> dl, double cap)
    {
        double alpha = cap;
        int i = 0;
        if (Vector.IsHardwareAccelerated)
        {
            // As the scalar loop below, a vector at a time: α only shrinks, so after the first few vectors almost none
            // limits it, and only a vector that does pays for a division (rows moving away from their bound are masked
            // out; their quotient may be ±∞ or NaN and is never read).
            var sv = MemoryMarshal.Cast<double, Vector<double>>(s);
            var lv = MemoryMarshal.Cast<double, Vector<double>>(lambda);
            var dsv = MemoryMarshal.Cast<double, Vector<double>>(ds);
            var dlv = MemoryMarshal.Cast<double, Vector<double>>(dl);
            var infinity = new Vector<double>(double.PositiveInfinity);
            var a = new Vector<double>(alpha);
            for (int v = 0; v < sv.Length; v++)
            {
                if (Vector.GreaterThanAny(a * -dsv[v], sv[v]))
                {
                    alpha = Math.Min(alpha, LaneMinimum(Vector.ConditionalSelect(Vector.LessThan(dsv[v], Vector<double>.Zero), sv[v] / -dsv[v], infinity)));
                    a = new Vector<double>(alpha);
                }

                if (Vector.GreaterThanAny(a * -dlv[v], lv[v]))
                {
                    alpha = Math.Min(alpha, LaneMinimum(Vector.ConditionalSelect(Vector.LessThan(dlv[v], Vector<double>.Zero), lv[v] / -dlv[v], infinity)));
                    a = new Vector<double>(alpha);
                }
            }

            i = sv.Length * Vector<double>.Count;
        }

        // α·(−Δ) ≤ value is tested by multiplying, so only a row that lowers the bound costs a division.
        for (; i < s.Length; i++)
        {
            if (alpha * -ds[i] > s[i])
            {
                alpha = s[i] / -ds[i];
            }

            if (alpha * -dl[i] > lambda[i])
            {
                alpha = lambda[i] / -dl[i];
            }
        }

        return alpha;
    }

    /// <summary>Σ (s + αΔs)(λ + αΔλ).</summary>
    public static double GapAfter(ReadOnlySpan<double> s, ReadOnlySpan<double> lambda, ReadOnlySpan<double> ds, ReadOnlySpan<double> dl, double alpha)
    {
        int i = 0;
        double sum = 0;
        if (Vector.IsHardwareAccelerated)
        {
            var sv = MemoryMarshal.Cast<double, Vector<double>>(s);
            var lv = MemoryMarshal.Cast<double, Vector<double>>(lambda);
            var dsv = MemoryMarshal.Cast<double, Vector<double>>(ds);
            var dlv = MemoryMarshal.Cast<double, Vector<double>>(dl);
            var a = new Vector<double>(alpha);
            var acc = Vector<double>.Zero;
            for (int v = 0; v < sv.Length; v++)
            {
                acc += (sv[v] + (a * dsv[v])) * (lv[v] + (a * dlv[v]));
            }

            sum = Vector.Sum(acc);
            i = sv.Length * Vector<double>.Count;
        }

        for (; i < s.Length; i++)
        {
            sum += (s[i] + (alpha * ds[i])) * (lambda[i] + (alpha * dl[i]));
        }

        return sum;
    }

    /// <summary>The corrector's λ̂ = λ − (λg + Δs_aΔλ_a − σμ)/s, with 1/s given.</summary>
    public static void CorrectorShift(ReadOnlySpan<double> lambda, ReadOnlySpan<double> value, ReadOnlySpan<double> inverse, ReadOnlySpan<double> dsAffine, ReadOnlySpan<double> dlAffine, double target, Span<double> shift)
    {
        int i = 0;
        if (Vector.IsHardwareAccelerated)
        {
            var lv = MemoryMarshal.Cast<double, Vector<double>>(lambda);
            var gv = MemoryMarshal.Cast<double, Vector<double>>(value);
            var iv = MemoryMarshal.Cast<double, Vector<double>>(inverse);
            var dsv = MemoryMarshal.Cast<double, Vector<double>>(dsAffine);
            var dlv = MemoryMarshal.Cast<double, Vector<double>>(dlAffine);
            var hv = MemoryMarshal.Cast<double, Vector<double>>(shift);
            var t = new Vector<double>(target);
            for (int v = 0; v < lv.Length; v++)
            {
                hv[v] = lv[v] - (((lv[v] * gv[v]) + (dsv[v] * dlv[v]) - t) * iv[v]);
            }

            i = lv.Length * Vector<double>.Count;
        }

        for (; i < lambda.Length; i++)
        {
            shift[i] = lambda[i] - (((lambda[i] * value[i]) + (dsAffine[i] * dlAffine[i]) - target) * inverse[i]);
        }
    }

    private static double LaneMinimum(Vector<double> values)
    {
        double least = double.PositiveInfinity;
        for (int lane = 0; lane < Vector<double>.Count; lane++)
        {
            least = Math.Min(least, values[lane]);
        }

        return least;
    }

    /// <summary>s += αΔs, λ += αΔλ.</summary>
    public static void Move(Span<double> s, Span<double> lambda, ReadOnlySpan<double> ds, ReadOnlySpan<double> dl, double alpha)
    {
        int i = 0;
        if (Vector.IsHardwareAccelerated)
        {
            var sv = MemoryMarshal.Cast<double, Vector<double>>(s);
            var lv = MemoryMarshal.Cast<double, Vector<double>>(lambda);
            var dsv = MemoryMarshal.Cast<double, Vector<double>>(ds);
            var dlv = MemoryMarshal.Cast<double, Vector<double>>(dl);
            var a = new Vector<double>(alpha);
            for (int v = 0; v < sv.Length; v++)
            {
                sv[v] += a * dsv[v];
                lv[v] += a * dlv[v];
            }

            i = sv.Length * Vector<double>.Count;
        }

        for (; i < s.Length; i++)
        {
            s[i] += alpha * ds[i];
            lambda[i] += alpha * dl[i];
        }
    }

    /// <summary>
    /// (max |g − s|, max_i min(s̄_i, λ̄_i, w·s̄_iλ̄_i), Σ sλ) with s̄ = s·<paramref name="rowScale"/>,
    /// λ̄ = λ·<paramref name="multiplierScale"/> and w = <paramref name="degenerateWeight"/>: the primal residual, how
    /// far the worst row is from complementarity in scale-free terms, and the duality gap.
    /// </summary>
    public static (double Primal, double Complementarity, double Gap) Residuals(ReadOnlySpan<double> s, ReadOnlySpan<double> lambda, ReadOnlySpan<double> value, double rowScale, double multiplierScale, double degenerateWeight)
    {
        int i = 0;
        double primal = 0;
        double worst = 0;
        double sum = 0;
        if (Vector.IsHardwareAccelerated)
        {
            var sv = MemoryMarshal.Cast<double, Vector<double>>(s);
            var lv = MemoryMarshal.Cast<double, Vector<double>>(lambda);
            var gv = MemoryMarshal.Cast<double, Vector<double>>(value);
            var rs = new Vector<double>(rowScale);
            var ms = new Vector<double>(multiplierScale);
            var dw = new Vector<double>(degenerateWeight);
            var primalV = Vector<double>.Zero;
            var worstV = Vector<double>.Zero;
            var sumV = Vector<double>.Zero;
            for (int v = 0; v < sv.Length; v++)
            {
                primalV = Vector.Max(primalV, Vector.Abs(gv[v] - sv[v]));
                var scaledS = sv[v] * rs;
                var scaledL = lv[v] * ms;
                worstV = Vector.Max(worstV, Vector.Min(Vector.Min(scaledS, scaledL), dw * scaledS * scaledL));
                sumV += sv[v] * lv[v];
            }

            for (int lane = 0; lane < Vector<double>.Count; lane++)
            {
                primal = primal > primalV[lane] ? primal : primalV[lane];
                worst = worst > worstV[lane] ? worst : worstV[lane];
            }

            sum = Vector.Sum(sumV);
            i = sv.Length * Vector<double>.Count;
        }

        for (; i < s.Length; i++)
        {
            double difference = Math.Abs(value[i] - s[i]);
            double scaledS = s[i] * rowScale;
            double scaledL = lambda[i] * multiplierScale;
            double scaled = Math.Min(Math.Min(scaledS, scaledL), degenerateWeight * scaledS * scaledL);
            primal = primal > difference ? primal : difference;
            worst = worst > scaled ? worst : scaled;
            sum += s[i] * lambda[i];
        }

        return (primal, worst, sum);
    }
}
