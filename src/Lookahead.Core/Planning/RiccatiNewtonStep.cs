using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;

namespace Lookahead.Core.Planning;

/// <summary>
/// The Newton system of the limited plan solved as a linear–quadratic control problem by one backward Riccati
/// recursion and one forward rollout (Rao, Wright &amp; Rawlings, J. Optim. Theory Appl. 99(3), 1998): cost per
/// factorisation O(N(n+m)³), independent of how many limits are active.
/// <para>
/// The step (Δu, Δε), with Δx_{k+1} = AΔx_k + BΔu_k and Δx_0 = 0, minimises
/// <code>
/// Σ_k ½Δu_kᵀ(R + D^u_k)Δu_k + ½(Δu_k − Δu_{k−1})ᵀ(S + D^Δ_k)(Δu_k − Δu_{k−1}) + ½Δx_kᵀH_kΔx_k + Δx_kᵀE_kΔε
///   + ½Δεᵀdiag(w + D^ε + Σ_k D^lo_k + D^hi_k)Δε + linear terms,
/// </code>
/// H_k = CᵀQC (P at k = N) + Σ_s c_s c_sᵀ(D^lo_{k,s} + D^hi_{k,s}), column s of E_k = c_s(D^lo_{k,s} − D^hi_{k,s}),
/// where the D are the barrier weights λ/s of the limit rows. The Δu_{k−1} coupling is carried by the augmented
/// state z_k = (x_k, u_{k−1}) (its second part only when there is a rate weight or a rate limit); the slacks ε,
/// shared by every stage, enter the value function as a parameter, V_k(z, ε) = ½zᵀP_kz + zᵀM_kε + ½εᵀW_kε + …,
/// and are solved for at stage 0, where z_0 = (x_0, u_{−1}) is fixed.
/// </para>
/// <para>
/// The blocks are a few rows wide, so every product is written as row updates z_i += a·y_l on rows padded to whole
/// 256-bit vectors (<see cref="RiccatiWorkspace"/>): one fused multiply–add per 4 entries, no scalar tails, no
/// bounds checks. The matrices live on the pinned heap and are addressed by pointer.
/// </para>
/// Immutable; every buffer lives in the workspace passed in.
/// </summary>
internal sealed unsafe partial class RiccatiNewtonStep
{
    private readonly int n;
    private readonly int m;
    private readonly int nv;
    private readonly int ns;
    private readonly int np;
    private readonly int mp;
    private readonly int sp;
    private readonly int kp;
    private readonly int horizon;
    private readonly double[] constants;
    private readonly double* a;
    private readonly double* at;
    private readonly double* b;
    private readonly double* bt;
    private readonly double* qx;
    private readonly double* r;
    private readonly double* s;
    private readonly double* terminal;
    private readonly double* cs;
    private readonly double* slackWeights;
    private readonly ModelTiles? tiles;

    /// <param name="a">A, n×n row-major.</param>
    /// <param name="b">B, n×m row-major.</param>
    /// <param name="qx">CᵀQC, n×n row-major.</param>
    /// <param name="r">R, m×m.</param>
    /// <param name="s">S, m×m (zeros when there is no rate weight).</param>
    /// <param name="terminal">P, n×n.</param>
    /// <param name="cs">Rows of C of the softly limited outputs, ns×n.</param>
    /// <param name="slackWeights">w_s, the quadratic weight of each slack.</param>
    /// <param name="carriesPreviousInput">Whether the state is augmented with u_{k−1} (rate weight or rate limits).</param>
    /// <param name="allowTiles">Use the 4×4-tile recursion when the sizes allow it (false only to compare the two in tests).</param>
    public RiccatiNewtonStep(int horizon, double[] a, double[] b, double[] qx, double[] r, double[] s, double[] terminal, double[] cs, double[] slackWeights, bool carriesPreviousInput, bool allowTiles = true)
    {
        n = (int)Math.Round(Math.Sqrt(a.Length));
        m = b.Length / n;
        ns = cs.Length / n;
        nv = carriesPreviousInput ? m : 0;
        np = RiccatiWorkspace.Pad(n);
        mp = RiccatiWorkspace.Pad(m);
        sp = RiccatiWorkspace.Pad(ns);
        kp = np + (nv > 0 ? mp : 0);
        this.horizon = horizon;

        // The model's matrices, padded, in one pinned block addressed for the model's lifetime.
        var blocks = new (double[] Source, int Rows, int Columns, bool Transpose)[]
        {
            (a, n, n, false), (a, n, n, true), (b, n, m, false), (b, n, m, true), (qx, n, n, false),
            (r, m, m, false), (s, m, m, false), (terminal, n, n, false), (cs, ns, n, false), (slackWeights, 1, ns, false),
        };
        int total = blocks.Sum(x => (x.Transpose ? x.Columns : x.Rows) * RiccatiWorkspace.Pad(x.Transpose ? x.Rows : x.Columns));
        constants = GC.AllocateArray<double>(Math.Max(total, 1), pinned: true);
        var at = new double*[blocks.Length];
        double* start = Pointer(constants);
        int offset = 0;
        for (int q = 0; q < blocks.Length; q++)
        {
            var (source, rows, columns, transpose) = blocks[q];
            int outRows = transpose ? columns : rows;
            int outColumns = transpose ? rows : columns;
            int stride = RiccatiWorkspace.Pad(outColumns);
            for (int i = 0; i < outRows; i++)
            {
                for (int j = 0; j < outColumns; j++)
                {
                    constants[offset + (i * stride) + j] = transpose ? source[(j * columns) + i] : source[(i * columns) + j];
                }
            }

            at[q] = start + offset;
            offset += outRows * stride;
        }

        this.a = at[0];
        this.at = at[1];
        this.b = at[2];
        bt = at[3];
        this.qx = at[4];
        this.r = at[5];
        this.s = at[6];
        this.terminal = at[7];
        this.cs = at[8];
        this.slackWeights = at[9];
        tiles = allowTiles && Tile.IsSupported && n <= 4 && m <= 4 && ns <= 4 ? new ModelTiles(a, b, qx, r, s, terminal, cs, n, m, ns) : null;
    }

    /// <summary>Whether <see cref="Factor"/> runs on 4×4 tiles (n, m and ns ≤ 4 on a processor with AVX and FMA).</summary>
    public bool IsTiled => tiles is not null;

    /// <summary>The model's matrices as tiles when <see cref="IsTiled"/>, for the other per-stage loops of the solve.</summary>
    public ModelTiles? Tiles => tiles;

    public RiccatiWorkspace CreateWorkspace() => new(n, m, nv, ns, horizon, tiled: tiles is not null);

    /// <summary>
    /// Backward recursion for the barrier weights in <paramref name="ws"/> (InputBarrier, RateBarrier, OutputBarrierSum,
    /// OutputBarrierDifference, SlackBarrier): stores per stage the Cholesky factor of
    /// G_k = R + D^u_k + (S + D^Δ_k) + B̃ᵀP_{k+1}B̃, the gain K_k = G_k⁻¹F_kᵀ and the slack gain G_k⁻¹B̃ᵀM_{k+1},
    /// and the factor of the reduced slack system.
    /// </summary>
    /// <returns>False when a G_k or the slack system is not numerically positive definite.</returns>
    public bool Factor(InteriorPointWorkspace ws, bool hasPrevious)
    {
        if (tiles is not null)
        {
            return FactorTiled(ws, hasPrevious);
        }

        GC.KeepAlive(constants);
        var rw = ws.Riccati;
        double* pxx = Pointer(rw.Pxx);
        double* nextPxx = Pointer(rw.NextPxx);
        double* mx = Pointer(rw.Mx);
        double* nextMx = Pointer(rw.NextMx);
        double* pxv = Pointer(rw.Pxv);
        double* pvv = Pointer(rw.Pvv);
        double* mv = Pointer(rw.Mv);
        double* yx = Pointer(rw.Yx);
        double* yv = Pointer(rw.Yv);
        double* fxT = Pointer(rw.FxT);
        double* rest = Pointer(rw.Rest);
        double* rate = Pointer(rw.Rate);
        double* coupling = Pointer(rw.Coupling);
        double* w = Pointer(rw.W);
        double* z = Pointer(rw.Z);
        double* work = Pointer(rw.Work);
        double* inputBarrier = Pointer(ws.InputBarrier);
        double* rateBarrier = Pointer(ws.RateBarrier);
        double* outputSum = Pointer(ws.OutputBarrierSum);
        double* outputDifference = Pointer(ws.OutputBarrierDifference);

        Copy(terminal, pxx, n * np);
        AddOutputCurvature(pxx, outputSum + (horizon * ns));
        SetOutputCoupling(mx, outputDifference + (horizon * ns));
        Clear(pxv, n * mp);
        Clear(pvv, m * mp);
        Clear(mv, m * sp);
        Clear(w, ns * sp);

        for (int k = horizon - 1; k >= 0; k--)
        {
            bool rateHere = nv > 0 && (k > 0 || hasPrevious);
            double* factor = Pointer(rw.Factor) + (k * m * m);
            double* slackGain = Pointer(rw.SlackGain) + (k * m * sp);

            // Y = P_{k+1}B̃: Yx = Pxx B + Pxv (n×m), Yv = Pxvᵀ B + Pvv (m×m).
            RowsTimes(pxx, n, n, np, b, mp, yx, mp, mp, clear: true, subtract: false);
            if (nv > 0)
            {
                Add(pxv, yx, n * mp);
                TransposeTimes(pxv, n, m, mp, b, mp, yv, mp, mp, clear: true, subtract: false);
                Add(pvv, yv, m * mp);
            }

            // X = R + D^u_k + B̃ᵀP_{k+1}B̃ (G_k without its rate block), made exactly symmetric.
            TransposeTimes(b, n, m, mp, yx, mp, rest, mp, mp, clear: true, subtract: false);
            if (nv > 0)
            {
                Add(yv, rest, m * mp);
            }

            Add(r, rest, m * mp);
            double* du = inputBarrier + (k * m);
            for (int i = 0; i < m; i++)
            {
                rest[(i * mp) + i] += du[i];
                for (int j = 0; j < i; j++)
                {
                    double v = 0.5 * (rest[(i * mp) + j] + rest[(j * mp) + i]);
                    rest[(i * mp) + j] = v;
                    rest[(j * mp) + i] = v;
                }
            }

            // L = B̃ᵀM_{k+1} (m×ns), before M is overwritten.
            if (ns > 0)
            {
                TransposeTimes(b, n, m, mp, mx, sp, coupling, sp, sp, clear: true, subtract: false);
                if (nv > 0)
                {
                    Add(mv, coupling, m * sp);
                }
            }

            if (rateHere)
            {
                Copy(s, rate, m * mp);
                double* dd = rateBarrier + (k * m);
                for (int i = 0; i < m; i++)
                {
                    rate[(i * mp) + i] += dd[i];
                }
            }

            for (int i = 0; i < m; i++)
            {
                for (int j = 0; j <= i; j++)
                {
                    factor[(i * m) + j] = rest[(i * mp) + j] + (rateHere ? rate[(i * mp) + j] : 0);
                }
            }

            if (!Cholesky(factor, m))
            {
                return false;
            }

            if (ns > 0)
            {
                // G⁻¹L, and W_k = W_{k+1} − LᵀG⁻¹L.
                Copy(coupling, slackGain, m * sp);
                CholeskySolveRows(factor, m, slackGain, sp, sp);
                Transpose(slackGain, m, sp, sp, Pointer(rw.SlackGainTransposed) + (k * sp * mp), mp);
                TransposeTimes(coupling, m, ns, sp, slackGain, sp, w, sp, sp, clear: false, subtract: true);
            }

            if (k == 0)
            {
                break;
            }

            // Gain K = G⁻¹[F_x F_v]ᵀ with F_xᵀ = YxᵀA and F_v = −(S + D^Δ_k).
            double* gain = Pointer(rw.Gain) + (k * m * kp);
            TransposeTimes(yx, n, m, mp, a, np, fxT, np, np, clear: true, subtract: false);
            for (int i = 0; i < m; i++)
            {
                Copy(fxT + (i * np), gain + (i * kp), np);
                for (int j = 0; j < nv; j++)
                {
                    gain[(i * kp) + np + j] = -rate[(i * mp) + j];
                }

                for (int j = nv; j < kp - np; j++)
                {
                    gain[(i * kp) + np + j] = 0;
                }
            }

            CholeskySolveRows(factor, m, gain, kp, kp);
            Transpose(gain, m, kp, kp, Pointer(rw.GainTransposed) + (k * kp * mp), mp);

            // P^xx_k = H_k + AᵀP^xx_{k+1}A − F_x K_x, made exactly symmetric.
            RowsTimes(pxx, n, n, np, a, np, work, np, np, clear: true, subtract: false);
            Copy(qx, nextPxx, n * np);
            TransposeTimes(a, n, n, np, work, np, nextPxx, np, np, clear: false, subtract: false);
            TransposeTimes(fxT, m, n, np, gain, kp, nextPxx, np, np, clear: false, subtract: true);
            for (int i = 0; i < n; i++)
            {
                for (int j = 0; j < i; j++)
                {
                    double v = 0.5 * (nextPxx[(i * np) + j] + nextPxx[(j * np) + i]);
                    nextPxx[(i * np) + j] = v;
                    nextPxx[(j * np) + i] = v;
                }

                for (int j = n; j < np; j++)
                {
                    nextPxx[(i * np) + j] = 0;
                }
            }

            AddOutputCurvature(nextPxx, outputSum + (k * ns));

            // M^x_k = E_k + AᵀM^x_{k+1} − F_x G⁻¹L.
            if (ns > 0)
            {
                SetOutputCoupling(nextMx, outputDifference + (k * ns));
                TransposeTimes(a, n, n, np, mx, sp, nextMx, sp, sp, clear: false, subtract: false);
                TransposeTimes(fxT, m, n, np, slackGain, sp, nextMx, sp, sp, clear: false, subtract: true);
            }

            if (nv > 0)
            {
                // P^xv_k = K_xᵀ(S + D^Δ); P^vv_k = (S + D^Δ)G⁻¹X, written without the cancellation of
                // (S + D^Δ) − (S + D^Δ)G⁻¹(S + D^Δ) when a rate row's barrier weight is huge; M^v_k = (S + D^Δ)G⁻¹L.
                TransposeTimes(gain, m, n, kp, rate, mp, pxv, mp, mp, clear: true, subtract: false);
                Copy(rest, z, m * mp);
                CholeskySolveRows(factor, m, z, mp, mp);
                RowsTimes(rate, m, m, mp, z, mp, pvv, mp, mp, clear: true, subtract: false);
                for (int i = 0; i < m; i++)
                {
                    for (int j = 0; j < i; j++)
                    {
                        double v = 0.5 * (pvv[(i * mp) + j] + pvv[(j * mp) + i]);
                        pvv[(i * mp) + j] = v;
                        pvv[(j * mp) + i] = v;
                    }
                }

                if (ns > 0)
                {
                    RowsTimes(rate, m, m, mp, slackGain, sp, mv, sp, sp, clear: true, subtract: false);
                }
            }

            double* swap = pxx;
            pxx = nextPxx;
            nextPxx = swap;
            swap = mx;
            mx = nextMx;
            nextMx = swap;
        }

        return FactorSlackSystem(ws, w, sp);
    }

    /// <summary>The reduced slack system W_0 + diag(w + D^ε + Σ_k D^lo_k + D^hi_k), factored; false when not positive definite.</summary>
    private bool FactorSlackSystem(InteriorPointWorkspace ws, double* w, int stride)
    {
        if (ns == 0)
        {
            return true;
        }

        double* system = Pointer(ws.Riccati.SlackSystem);
        double* slackBarrier = Pointer(ws.SlackBarrier);
        double* outputSum = Pointer(ws.OutputBarrierSum);
        for (int i = 0; i < ns; i++)
        {
            for (int j = 0; j <= i; j++)
            {
                system[(i * ns) + j] = 0.5 * (w[(i * stride) + j] + w[(j * stride) + i]);
            }

            double sum = slackWeights[i] + slackBarrier[i];
            for (int k = 1; k <= horizon; k++)
            {
                sum += outputSum[(k * ns) + i];
            }

            system[(i * ns) + i] += sum;
        }

        return Cholesky(system, ns);
    }

    /// <summary>
    /// The step for linear terms InputGradient (per u_k), StateGradient (per x_k, k ≥ 1) and SlackGradient (per ε),
    /// with the factors of the last <see cref="Factor"/>; writes StepInputs, StepStates (Δx_0 = 0) and StepSlacks.
    /// </summary>
    public void Solve(InteriorPointWorkspace ws)
    {
        if (tiles is not null)
        {
            SolveTiled(ws);
            return;
        }

        GC.KeepAlive(constants);
        var rw = ws.Riccati;
        double* px = Pointer(rw.Costate);
        double* nextPx = Pointer(rw.NextCostate);
        double* pv = Pointer(rw.CostateV);
        double* g = Pointer(rw.Stage);
        double* wv = Pointer(rw.SlackVector);
        double* ru = Pointer(ws.InputGradient);
        double* qState = Pointer(ws.StateGradient);
        double* feedforward = Pointer(rw.Feedforward);
        double* rateBarrier = Pointer(ws.RateBarrier);

        Clear(px, np);
        Copy(qState + (horizon * n), px, n);
        Clear(pv, mp);
        Clear(wv, sp);
        Clear(g, mp);
        for (int k = horizon - 1; k >= 0; k--)
        {
            // g = r_k + B̃ᵀp_{k+1}; kk = G⁻¹g; w −= (G⁻¹L)ᵀg.
            if (nv > 0)
            {
                Copy(pv, g, mp);
                Add(ru + (k * m), g, m);
            }
            else
            {
                Copy(ru + (k * m), g, m);
            }

            Accumulate(px, 1, n, b, mp, g, mp, clear: false, subtract: false);
            double* kk = feedforward + (k * m);
            Copy(g, kk, m);
            CholeskySolveVector(Pointer(rw.Factor) + (k * m * m), m, kk);
            if (ns > 0)
            {
                Accumulate(g, 1, m, Pointer(rw.SlackGain) + (k * m * sp), sp, wv, sp, clear: false, subtract: true);
            }

            if (k == 0)
            {
                break;
            }

            // p^x_k = q_k + Aᵀp^x_{k+1} − K_xᵀg; p^v_k = (S + D^Δ_k)kk.
            double* gain = Pointer(rw.Gain) + (k * m * kp);
            Copy(qState + (k * n), nextPx, n);
            Accumulate(px, 1, n, a, np, nextPx, np, clear: false, subtract: false);
            Accumulate(g, 1, m, gain, kp, nextPx, np, clear: false, subtract: true);
            double* swap = px;
            px = nextPx;
            nextPx = swap;
            if (nv > 0)
            {
                double* dd = rateBarrier + (k * m);
                Accumulate(kk, 1, m, s, mp, pv, mp, clear: true, subtract: false);
                for (int l = 0; l < m; l++)
                {
                    pv[l] += dd[l] * kk[l];
                }
            }
        }

        // Δε = −(W_0 + diag(w + D^ε + Σ_k D^lo + D^hi))⁻¹(w_0 + q_ε).
        double* stepSlack = Pointer(rw.StepSlack);
        double* stepSlacks = Pointer(ws.StepSlacks);
        Clear(stepSlack, sp);
        if (ns > 0)
        {
            double* qe = Pointer(ws.SlackGradient);
            for (int j = 0; j < ns; j++)
            {
                stepSlack[j] = -(wv[j] + qe[j]);
            }

            CholeskySolveVector(Pointer(rw.SlackSystem), ns, stepSlack);
            Copy(stepSlack, stepSlacks, ns);
        }

        // Forward: Δu_k = −(kk_k + (G⁻¹L)Δε + K_k Δz_k), Δx_{k+1} = AΔx_k + BΔu_k, from the transposed gains.
        double* du = Pointer(ws.StepInputs);
        double* dx = Pointer(ws.StepStates);
        double* x = Pointer(rw.StepState);
        double* nextX = Pointer(rw.NextStepState);
        double* u = Pointer(rw.StepInput);
        double* previous = Pointer(rw.PreviousStepInput);
        Clear(x, np);
        Clear(u, mp);
        Clear(previous, mp);
        Clear(dx, n);
        for (int k = 0; k < horizon; k++)
        {
            Clear(u, mp);
            Copy(feedforward + (k * m), u, m);
            if (ns > 0)
            {
                Accumulate(stepSlack, 1, ns, Pointer(rw.SlackGainTransposed) + (k * sp * mp), mp, u, mp, clear: false, subtract: false);
            }

            if (k > 0)
            {
                double* gainT = Pointer(rw.GainTransposed) + (k * kp * mp);
                Accumulate(x, 1, n, gainT, mp, u, mp, clear: false, subtract: false);
                if (nv > 0)
                {
                    Accumulate(previous, 1, m, gainT + (np * mp), mp, u, mp, clear: false, subtract: false);
                }
            }

            for (int i = 0; i < m; i++)
            {
                u[i] = -u[i];
            }

            Accumulate(x, 1, n, at, np, nextX, np, clear: true, subtract: false);
            Accumulate(u, 1, m, bt, np, nextX, np, clear: false, subtract: false);
            Copy(u, du + (k * m), m);
            Copy(nextX, dx + ((k + 1) * n), n);
            double* swap = x;
            x = nextX;
            nextX = swap;
            swap = previous;
            previous = u;
            u = swap;
        }
    }

    /// <summary>target (rows×length) = sourceᵀ for a source of rows' = <paramref name="rows"/> × columns, padding zero.</summary>
    private static void Transpose(double* source, int rows, int columns, int sourceStride, double* target, int targetStride)
    {
        for (int j = 0; j < columns; j++)
        {
            double* tj = target + (j * targetStride);
            for (int i = 0; i < targetStride; i++)
            {
                tj[i] = i < rows ? source[(i * sourceStride) + j] : 0;
            }
        }
    }

    /// <summary>target (n padded rows) += Σ_s d_s c_s c_sᵀ (the output rows' barrier curvature at one stage).</summary>
    private void AddOutputCurvature(double* target, double* outputSum)
    {
        for (int t = 0; t < ns; t++)
        {
            double d = outputSum[t];
            if (d == 0)
            {
                continue;
            }

            double* row = cs + (t * np);
            for (int i = 0; i < n; i++)
            {
                double ci = d * row[i];
                if (ci != 0)
                {
                    Axpy(ci, row, target + (i * np), np);
                }
            }
        }
    }

    /// <summary>target (n×ns, padded) = E, column s = c_s(D^lo_s − D^hi_s), for one stage.</summary>
    private void SetOutputCoupling(double* target, double* outputDifference)
    {
        for (int i = 0; i < n; i++)
        {
            double* ti = target + (i * sp);
            for (int t = 0; t < sp; t++)
            {
                ti[t] = t < ns ? cs[(t * np) + i] * outputDifference[t] : 0;
            }
        }
    }

    /// <summary>z_i (±)= Σ_l x[i, l]·y_l for i &lt; rows, l &lt; inner; x has row stride xs, y and z rows of <paramref name="length"/> (a multiple of 4).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void RowsTimes(double* x, int rows, int inner, int xs, double* y, int ys, double* z, int zs, int length, bool clear, bool subtract)
    {
        for (int i = 0; i < rows; i++)
        {
            double* xi = x + (i * xs);
            Accumulate(xi, 1, inner, y, ys, z + (i * zs), length, clear, subtract);
        }
    }

    /// <summary>z_i (±)= Σ_l x[l, i]·y_l (z = xᵀy) for i &lt; rows, l &lt; inner; x has row stride xs.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void TransposeTimes(double* x, int inner, int rows, int xs, double* y, int ys, double* z, int zs, int length, bool clear, bool subtract)
    {
        for (int i = 0; i < rows; i++)
        {
            Accumulate(x + i, xs, inner, y, ys, z + (i * zs), length, clear, subtract);
        }
    }

    /// <summary>z (±)= Σ_l c[l·cs]·y_l over rows of <paramref name="length"/>, kept in registers for one or two vectors.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void Accumulate(double* c, int cs, int inner, double* y, int ys, double* z, int length, bool clear, bool subtract)
    {
        if (length == 4)
        {
            var acc = clear ? Vector256<double>.Zero : Vector256.Load(z);
            for (int l = 0; l < inner; l++)
            {
                double coefficient = subtract ? -c[l * cs] : c[l * cs];
                acc = Vector256.FusedMultiplyAdd(Vector256.Create(coefficient), Vector256.Load(y + (l * ys)), acc);
            }

            Vector256.Store(acc, z);
            return;
        }

        if (length == 8)
        {
            var acc0 = clear ? Vector256<double>.Zero : Vector256.Load(z);
            var acc1 = clear ? Vector256<double>.Zero : Vector256.Load(z + 4);
            for (int l = 0; l < inner; l++)
            {
                var coefficient = Vector256.Create(subtract ? -c[l * cs] : c[l * cs]);
                double* yl = y + (l * ys);
                acc0 = Vector256.FusedMultiplyAdd(coefficient, Vector256.Load(yl), acc0);
                acc1 = Vector256.FusedMultiplyAdd(coefficient, Vector256.Load(yl + 4), acc1);
            }

            Vector256.Store(acc0, z);
            Vector256.Store(acc1, z + 4);
            return;
        }

        if (clear)
        {
            Clear(z, length);
        }

        for (int l = 0; l < inner; l++)
        {
            double coefficient = subtract ? -c[l * cs] : c[l * cs];
            if (coefficient != 0)
            {
                Axpy(coefficient, y + (l * ys), z, length);
            }
        }
    }

    /// <summary>y += a·x over <paramref name="length"/> entries (a multiple of 4).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void Axpy(double a, double* x, double* y, int length)
    {
        var av = Vector256.Create(a);
        for (int j = 0; j < length; j += 4)
        {
            Vector256.Store(Vector256.FusedMultiplyAdd(av, Vector256.Load(x + j), Vector256.Load(y + j)), y + j);
        }
    }

    /// <summary>
    /// In-place lower Cholesky factor L of a symmetric size×size block (lower triangle read), with 1/L_ii stored on the
    /// diagonal so the solves multiply instead of divide; false when a pivot is not positive.
    /// </summary>
    private static bool Cholesky(double* g, int size)
    {
        for (int j = 0; j < size; j++)
        {
            double* gj = g + (j * size);
            double d = gj[j];
            for (int l = 0; l < j; l++)
            {
                d -= gj[l] * gj[l];
            }

            if (!(d > 0) || !double.IsFinite(d))
            {
                return false;
            }

            double inverse = 1 / Math.Sqrt(d);
            gj[j] = inverse;
            for (int i = j + 1; i < size; i++)
            {
                double* gi = g + (i * size);
                double sum = gi[j];
                for (int l = 0; l < j; l++)
                {
                    sum -= gi[l] * gj[l];
                }

                gi[j] = sum * inverse;
            }
        }

        return true;
    }

    /// <summary>
    /// Solves LLᵀX = B in place for B with <paramref name="size"/> rows of <paramref name="length"/> (a multiple of 4),
    /// stride <paramref name="stride"/>; L from <see cref="Cholesky"/>. Each row is updated in registers.
    /// </summary>
    private static void CholeskySolveRows(double* l, int size, double* rhs, int stride, int length)
    {
        for (int c = 0; c < length; c += 4)
        {
            for (int i = 0; i < size; i++)
            {
                double* li = l + (i * size);
                var acc = Vector256.Load(rhs + (i * stride) + c);
                for (int k = 0; k < i; k++)
                {
                    acc = Vector256.FusedMultiplyAdd(Vector256.Create(-li[k]), Vector256.Load(rhs + (k * stride) + c), acc);
                }

                Vector256.Store(acc * Vector256.Create(li[i]), rhs + (i * stride) + c);
            }

            for (int i = size - 1; i >= 0; i--)
            {
                var acc = Vector256.Load(rhs + (i * stride) + c);
                for (int k = i + 1; k < size; k++)
                {
                    acc = Vector256.FusedMultiplyAdd(Vector256.Create(-l[(k * size) + i]), Vector256.Load(rhs + (k * stride) + c), acc);
                }

                Vector256.Store(acc * Vector256.Create(l[(i * size) + i]), rhs + (i * stride) + c);
            }
        }
    }

    /// <summary>Solves LLᵀx = b in place for one vector (L from <see cref="Cholesky"/>).</summary>
    private static void CholeskySolveVector(double* l, int size, double* x)
    {
        for (int i = 0; i < size; i++)
        {
            double sum = x[i];
            double* li = l + (i * size);
            for (int k = 0; k < i; k++)
            {
                sum -= li[k] * x[k];
            }

            x[i] = sum * li[i];
        }

        for (int i = size - 1; i >= 0; i--)
        {
            double sum = x[i];
            for (int k = i + 1; k < size; k++)
            {
                sum -= l[(k * size) + i] * x[k];
            }

            x[i] = sum * l[(i * size) + i];
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void Scale(double a, double* x, int length)
    {
        var av = Vector256.Create(a);
        for (int j = 0; j < length; j += 4)
        {
            Vector256.Store(av * Vector256.Load(x + j), x + j);
        }
    }

    private static void Add(double* source, double* target, int length)
    {
        for (int i = 0; i < length; i++)
        {
            target[i] += source[i];
        }
    }

    private static void Copy(double* source, double* target, int length)
    {
        for (int i = 0; i < length; i++)
        {
            target[i] = source[i];
        }
    }

    private static void Clear(double* target, int length)
    {
        for (int i = 0; i < length; i++)
        {
            target[i] = 0;
        }
    }

    /// <summary>Address of a pinned array's first element (the workspaces and the constants live on the pinned heap).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static double* Pointer(double[] array) => (double*)Unsafe.AsPointer(ref MemoryMarshal.GetArrayDataReference(array));
}
