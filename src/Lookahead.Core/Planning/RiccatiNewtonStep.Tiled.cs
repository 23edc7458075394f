using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;

namespace Lookahead.Core.Planning;

/// <summary>
/// The Riccati recursion and solve of <see cref="RiccatiNewtonStep"/> for models whose states, inputs and softly
/// limited outputs each fit one 256-bit vector (n, m, ns ≤ 4, like the cold-store demo). Every block is then a 4×4
/// tile with zero padding, so each product is sixteen fused multiply–adds with no loop bounds and no size branches;
/// G_k = LDLᵀ is applied as two tile products (D⁻¹L⁻¹, then L⁻ᵀ) instead of substitution chains. On the demo's sizes
/// (n = m = ns = 3, N = 30) a factorisation took 5.3 µs against 11.0 µs for the general row updates and a solve
/// 0.97 µs against 3.0 µs (docs/performance.md); the two agree to rounding (a property test holds them to each other).
/// The pieces marked <c>NoInlining</c> are kept out of line on purpose: inlined into one method they exceeded the
/// JIT's inlining budget, and the tile operations inside them became calls (about 7 % of a plan).
/// </summary>
internal sealed unsafe partial class RiccatiNewtonStep
{
    /// <summary>4×4 tiles in <see cref="RiccatiWorkspace.Tiles"/>, by position.</summary>
    private const int TilePxx = 0;
    private const int TilePxv = 1;
    private const int TilePvv = 2;
    private const int TileMx = 3;
    private const int TileMv = 4;
    private const int TileW = 5;
    private const int TileYx = 6;
    private const int TileRest = 7;
    private const int TileRate = 8;
    private const int TileCoupling = 9;
    private const int TileFxT = 10;
    private const int TileWork = 11;
    private const int TileScratch = 12;
    private const int TileFactor = 13;

    /// <summary>
    /// Per-stage tiles kept from <see cref="FactorTiled"/> for <see cref="SolveTiled"/>, by offset in a stage's block of
    /// <see cref="StageBlock"/> doubles: with G_k = LDLᵀ (L unit lower triangular), D⁻¹L⁻¹ and its transpose, the gain
    /// K_k = [K_x K_v] and its transpose, G_k⁻¹L and its transpose, and L⁻¹. Whole zero-padded tiles, so the solve
    /// multiplies by all four rows without size checks.
    /// </summary>
    private const int StageInverse = 0;
    private const int StageInverseTransposed = 16;
    private const int StageUnitInverse = 128;
    private const int StageGainX = 32;
    private const int StageGainV = 48;
    private const int StageGainXTransposed = 64;
    private const int StageGainVTransposed = 80;
    private const int StageSlackGainOffset = 96;
    private const int StageSlackGainTransposedOffset = 112;

    /// <summary>Doubles per stage in <see cref="RiccatiWorkspace.TiledStages"/>.</summary>
    internal const int StageBlock = 144;

    /// <summary>Tiles a workspace needs for <see cref="FactorTiled"/>.</summary>
    internal const int TileCount = 14;

    /// <summary>As <see cref="Factor"/>, on 4×4 tiles; only for n, m, ns ≤ 4.</summary>
    /// <remarks>
    /// Each stage is split into three methods so that the JIT inlines every tile operation inside them (one method
    /// holding the whole stage exceeded its inlining budget, and the tile operations became calls).
    /// </remarks>
    private bool FactorTiled(InteriorPointWorkspace ws, bool hasPrevious)
    {
        tiles!.KeepAlive();
        var rw = ws.Riccati;
        double* t = Pointer(rw.Tiles);
        double* outputSum = Pointer(ws.OutputBarrierSum);
        double* outputDifference = Pointer(ws.OutputBarrierDifference);

        Tile.Copy(tiles!.Terminal, t + (16 * TilePxx));
        AddOutputCurvatureTiled(t + (16 * TilePxx), tiles!.Cs, outputSum + (horizon * ns), t + (16 * TileScratch));
        SetOutputCouplingTiled(t + (16 * TileMx), tiles!.CsTransposed, outputDifference + (horizon * ns));
        Tile.Clear(t + (16 * TilePxv));
        Tile.Clear(t + (16 * TilePvv));
        Tile.Clear(t + (16 * TileMv));
        Tile.Clear(t + (16 * TileW));
        Tile.Clear(t + (16 * TileRate));

        for (int k = horizon - 1; k >= 0; k--)
        {
            bool rateHere = nv > 0 && (k > 0 || hasPrevious);
            double* factor = t + (16 * TileFactor);
            StageCurvature(ws, t, k, rateHere, factor);

            // G⁻¹ = L⁻ᵀ(D⁻¹L⁻¹) applied as two tile products (independent rows, no substitution chain).
            double* stage = Pointer(rw.TiledStages) + (k * StageBlock);
            if (!FactorTile(factor, stage))
            {
                return false;
            }
            if (ns > 0)
            {
                StageSlackGain(t, stage);
            }

            if (k == 0)
            {
                break;
            }

            StageGain(t, stage);
            StageValue(t, stage, outputSum + (k * ns), outputDifference + (k * ns));
        }

        return FactorSlackSystem(ws, t + (16 * TileW), 4);
    }

    /// <summary>
    /// Yx = Pxx B + Pxv; X = R + D^u + BᵀYx + Pxvᵀ B + Pvv (exactly symmetric); L = BᵀMx + Mv; the rate block S + D^Δ;
    /// and the lower triangle of G_k = X + rate block into the tile <paramref name="factor"/>.
    /// </summary>
    [MethodImpl(MethodImplOptions.NoInlining)]
    private void StageCurvature(InteriorPointWorkspace ws, double* t, int k, bool rateHere, double* factor)
    {
        double* pxv = t + (16 * TilePxv);
        double* yx = t + (16 * TileYx);
        double* rest = t + (16 * TileRest);
        double* rate = t + (16 * TileRate);
        double* scratch = t + (16 * TileScratch);
        double* tb = tiles!.B;
        Tile.Times(t + (16 * TilePxx), tb, pxv, yx);
        Tile.TransposeTimes(tb, yx, tiles!.R, rest);
        if (nv > 0)
        {
            Tile.TransposeTimes(pxv, tb, t + (16 * TilePvv), scratch);
            Tile.Add(scratch, rest);
        }

        Tile.Symmetrise(rest);
        double* du = Pointer(ws.InputBarrier) + (k * m);
        for (int i = 0; i < m; i++)
        {
            rest[(i * 4) + i] += du[i];
        }

        if (ns > 0)
        {
            Tile.TransposeTimes(tb, t + (16 * TileMx), nv > 0 ? t + (16 * TileMv) : null, t + (16 * TileCoupling));
        }

        if (rateHere)
        {
            Tile.Copy(tiles!.S, rate);
            double* dd = Pointer(ws.RateBarrier) + (k * m);
            for (int i = 0; i < m; i++)
            {
                rate[(i * 4) + i] += dd[i];
            }
        }
        else
        {
            Tile.Clear(rate);
        }

        for (int i = 0; i < m; i++)
        {
            for (int j = 0; j <= i; j++)
            {
                factor[(i * 4) + j] = rest[(i * 4) + j] + rate[(i * 4) + j];
            }
        }
    }

    /// <summary>G⁻¹L, kept with its transpose for the solve; W −= LᵀG⁻¹L.</summary>
    [MethodImpl(MethodImplOptions.NoInlining)]
    private static void StageSlackGain(double* t, double* stage)
    {
        double* coupling = t + (16 * TileCoupling);
        double* slackGain = stage + StageSlackGainOffset;
        double* w = t + (16 * TileW);
        Tile.Copy(coupling, slackGain);
        SolveTile(stage, slackGain);
        Tile.Transpose(slackGain, stage + StageSlackGainTransposedOffset);
        Tile.TransposeTimes(coupling, slackGain, w, w, subtract: true);
    }

    /// <summary>K = G⁻¹[F_x F_v]ᵀ with F_xᵀ = YxᵀA and F_v = −(S + D^Δ), kept with its transpose.</summary>
    [MethodImpl(MethodImplOptions.NoInlining)]
    private void StageGain(double* t, double* stage)
    {
        double* fxT = t + (16 * TileFxT);
        double* gainX = stage + StageGainX;
        Tile.TransposeTimes(t + (16 * TileYx), tiles!.A, null, fxT);
        Tile.Copy(fxT, gainX);
        SolveTile(stage, gainX);
        Tile.Transpose(gainX, stage + StageGainXTransposed);
        if (nv > 0)
        {
            double* gainV = stage + StageGainV;
            Tile.Negate(t + (16 * TileRate), gainV);
            SolveTile(stage, gainV);
            Tile.Transpose(gainV, stage + StageGainVTransposed);
        }
    }

    /// <summary>
    /// The value function one stage back: Pxx ← CᵀQC + AᵀPxxA − F_xK_x + output curvature; Mx ← E + AᵀMx − F_xG⁻¹L;
    /// P^xv = K_xᵀ(S + D^Δ); P^vv = (S + D^Δ)G⁻¹X symmetrised (no cancellation when a rate barrier is huge);
    /// M^v = (S + D^Δ)G⁻¹L. The old Pxx and Mx are read before they are overwritten.
    /// </summary>
    [MethodImpl(MethodImplOptions.NoInlining)]
    private void StageValue(double* t, double* stage, double* outputSum, double* outputDifference)
    {
        double* pxx = t + (16 * TilePxx);
        double* mx = t + (16 * TileMx);
        double* fxT = t + (16 * TileFxT);
        double* gainX = stage + StageGainX;
        double* slackGain = stage + StageSlackGainOffset;
        double* work = t + (16 * TileWork);
        double* scratch = t + (16 * TileScratch);
        double* ta = tiles!.A;
        Tile.Times(pxx, ta, null, work);
        Tile.TransposeTimes(ta, work, tiles!.Qx, scratch);
        Tile.TransposeTimes(fxT, gainX, scratch, scratch, subtract: true);
        Tile.Symmetrise(scratch);
        AddOutputCurvatureTiled(scratch, tiles!.Cs, outputSum, work);
        Tile.Copy(scratch, pxx);
        if (ns > 0)
        {
            SetOutputCouplingTiled(scratch, tiles!.CsTransposed, outputDifference);
            Tile.TransposeTimes(ta, mx, scratch, scratch);
            Tile.TransposeTimes(fxT, slackGain, scratch, mx, subtract: true);
        }

        if (nv > 0)
        {
            StageRateValue(t, stage);
        }
    }

    /// <summary>P^xv = K_xᵀ(S + D^Δ); P^vv = (S + D^Δ)G⁻¹X symmetrised; M^v = (S + D^Δ)G⁻¹L (see <see cref="StageValue"/>).</summary>
    [MethodImpl(MethodImplOptions.NoInlining)]
    private void StageRateValue(double* t, double* stage)
    {
        double* gainX = stage + StageGainX;
        double* slackGain = stage + StageSlackGainOffset;
        double* rate = t + (16 * TileRate);
        double* work = t + (16 * TileWork);
        Tile.TransposeTimes(gainX, rate, null, t + (16 * TilePxv));
        Tile.Copy(t + (16 * TileRest), work);
        SolveTile(stage, work);
        Tile.Times(rate, work, null, t + (16 * TilePvv));
        Tile.Symmetrise(t + (16 * TilePvv));
        if (ns > 0)
        {
            Tile.Times(rate, slackGain, null, t + (16 * TileMv));
        }
    }

    /// <summary>X ← G⁻¹X = L⁻ᵀ(D⁻¹L⁻¹X) for a tile X, with the stage's tiles from <see cref="FactorTile"/>; rows ≥ m stay zero.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void SolveTile(double* stage, double* x)
    {
        Tile.Times(stage + StageInverse, x, null, x);
        Tile.TransposeTimes(stage + StageUnitInverse, x, null, x);
    }

    /// <summary>
    /// G = LDLᵀ for the m×m lower triangle of the tile <paramref name="g"/> — no square roots, one division per column,
    /// which shortens the stage's dependency chain — and from it L⁻¹, D⁻¹L⁻¹ and (D⁻¹L⁻¹)ᵀ into the stage's tiles.
    /// </summary>
    /// <returns>False when a pivot is not positive and finite (G not numerically positive definite).</returns>
    [MethodImpl(MethodImplOptions.NoInlining)]
    private bool FactorTile(double* g, double* stage)
    {
        double* l = stackalloc double[16];
        double* inverseD = stackalloc double[4];
        for (int j = 0; j < m; j++)
        {
            double d = g[(j * 4) + j];
            for (int k = 0; k < j; k++)
            {
                d -= l[(j * 4) + k] * l[(j * 4) + k] * inverseD[k];
            }

            if (!(d > 0) || !double.IsFinite(d))
            {
                return false;
            }

            inverseD[j] = 1 / d;
            for (int i = j + 1; i < m; i++)
            {
                // l holds L·D column by column while it is built (L_ij·D_j), so each entry needs one product.
                double sum = g[(i * 4) + j];
                for (int k = 0; k < j; k++)
                {
                    sum -= l[(i * 4) + k] * l[(j * 4) + k] * inverseD[k];
                }

                l[(i * 4) + j] = sum;
            }
        }

        // L_ij = (LD)_ij / D_j; L⁻¹ by forward substitution on the unit diagonal.
        double* unit = stage + StageUnitInverse;
        Tile.Clear(unit);
        for (int j = 0; j < m; j++)
        {
            unit[(j * 4) + j] = 1;
            for (int i = j + 1; i < m; i++)
            {
                double sum = 0;
                for (int k = j; k < i; k++)
                {
                    sum += l[(i * 4) + k] * inverseD[k] * unit[(k * 4) + j];
                }

                unit[(i * 4) + j] = -sum;
            }
        }

        double* left = stage + StageInverse;
        for (int i = 0; i < 4; i++)
        {
            Vector256.Store(Vector256.Load(unit + (i * 4)) * Vector256.Create(i < m ? inverseD[i] : 0), left + (i * 4));
        }

        Tile.Transpose(left, stage + StageInverseTransposed);
        return true;
    }

    /// <summary>As <see cref="Solve"/>, with the tiles of the last <see cref="FactorTiled"/>.</summary>
    /// <remarks>In three methods, so that the JIT inlines every tile product inside each (see <see cref="FactorTiled"/>).</remarks>
    private void SolveTiled(InteriorPointWorkspace ws)
    {
        var wv = SolveTiledBackward(ws);

        // Δε = −(W_0 + diag(w + D^ε + Σ_k D^lo + D^hi))⁻¹(w_0 + q_ε).
        double* stepSlacks = Pointer(ws.StepSlacks);
        var stepSlack = Vector256<double>.Zero;
        if (ns > 0)
        {
            double* qe = Pointer(ws.SlackGradient);
            for (int j = 0; j < ns; j++)
            {
                stepSlacks[j] = -(wv.GetElement(j) + qe[j]);
            }

            CholeskySolveVector(Pointer(ws.Riccati.SlackSystem), ns, stepSlacks);
            stepSlack = Tile.LoadPartial(stepSlacks, ns);
        }

        SolveTiledForward(ws, stepSlack);
    }

    /// <summary>
    /// Backward: g = r_k + B̃ᵀp_{k+1}; kk = G⁻¹g (kept per stage); p^x_k = q_k + Aᵀp^x_{k+1} − K_xᵀg; p^v_k = (S + D^Δ)kk.
    /// Returns w = −Σ_k (G_k⁻¹L_k)ᵀg_k, the slacks' right-hand side.
    /// </summary>
    [MethodImpl(MethodImplOptions.NoInlining)]
    private Vector256<double> SolveTiledBackward(InteriorPointWorkspace ws)
    {
        tiles!.KeepAlive();
        double* ru = Pointer(ws.InputGradient);
        double* qState = Pointer(ws.StateGradient);
        double* rateBarrier = Pointer(ws.RateBarrier);
        double* feedforward = Pointer(ws.Riccati.TiledFeedforward);
        double* stages = Pointer(ws.Riccati.TiledStages);
        double* ta = tiles.A;
        double* tb = tiles.B;
        double* ts = tiles.S;
        var zero = Vector256<double>.Zero;
        var px = Tile.LoadPartial(qState + (horizon * n), n);
        var pv = zero;
        var wv = zero;
        for (int k = horizon - 1; k >= 0; k--)
        {
            double* stage = stages + (k * StageBlock);
            var g = Tile.Combine(px, tb, Tile.LoadPartial(ru + (k * m), m) + pv);
            var kk = Tile.Combine(Tile.Combine(g, stage + StageInverseTransposed, zero), stage + StageUnitInverse, zero);
            Vector256.Store(kk, feedforward + (k * 4));
            if (ns > 0)
            {
                wv = Tile.Combine(-g, stage + StageSlackGainOffset, wv);
            }

            if (k == 0)
            {
                break;
            }

            px = Tile.Combine(-g, stage + StageGainX, Tile.Combine(px, ta, Tile.LoadPartial(qState + (k * n), n)));
            if (nv > 0)
            {
                pv = Tile.Combine(kk, ts, Tile.LoadPartial(rateBarrier + (k * m), m) * kk);
            }
        }

        return wv;
    }

    /// <summary>Forward: Δu_k = −(kk_k + (G⁻¹L)Δε + K_kΔz_k), Δx_{k+1} = AΔx_k + BΔu_k.</summary>
    [MethodImpl(MethodImplOptions.NoInlining)]
    private void SolveTiledForward(InteriorPointWorkspace ws, Vector256<double> stepSlack)
    {
        tiles!.KeepAlive();
        double* feedforward = Pointer(ws.Riccati.TiledFeedforward);
        double* stages = Pointer(ws.Riccati.TiledStages);
        double* tat = tiles.ATransposed;
        double* tbt = tiles.BTransposed;
        double* du = Pointer(ws.StepInputs);
        double* dx = Pointer(ws.StepStates);
        var zero = Vector256<double>.Zero;
        var x = zero;
        var previous = zero;
        for (int i = 0; i < n; i++)
        {
            dx[i] = 0;
        }

        for (int k = 0; k < horizon; k++)
        {
            double* stage = stages + (k * StageBlock);
            var u = Vector256.Load(feedforward + (k * 4));
            if (ns > 0)
            {
                u = Tile.Combine(stepSlack, stage + StageSlackGainTransposedOffset, u);
            }

            if (k > 0)
            {
                u = Tile.Combine(x, stage + StageGainXTransposed, u);
                if (nv > 0)
                {
                    u = Tile.Combine(previous, stage + StageGainVTransposed, u);
                }
            }

            u = -u;
            x = Tile.Combine(u, tbt, Tile.Combine(x, tat, zero));
            Tile.StorePartial(u, du + (k * m), m);
            Tile.StorePartial(x, dx + ((k + 1) * n), n);
            previous = u;
        }
    }

    /// <summary>target += Σ_s d_s c_s c_sᵀ = C_sᵀ (diag(d) C_s), on tiles.</summary>
    private void AddOutputCurvatureTiled(double* target, double* tcs, double* outputSum, double* scratch)
    {
        if (ns == 0)
        {
            return;
        }

        for (int s = 0; s < 4; s++)
        {
            var d = Vector256.Create(s < ns ? outputSum[s] : 0);
            Vector256.Store(d * Vector256.Load(tcs + (s * 4)), scratch + (s * 4));
        }

        Tile.TransposeTimes(tcs, scratch, target, target);
    }

    /// <summary>target = E (n×ns): row i = (column i of C_s) ∘ (D^lo − D^hi), on tiles.</summary>
    private void SetOutputCouplingTiled(double* target, double* tcsT, double* outputDifference)
    {
        var difference = Vector256.Create(
            ns > 0 ? outputDifference[0] : 0,
            ns > 1 ? outputDifference[1] : 0,
            ns > 2 ? outputDifference[2] : 0,
            ns > 3 ? outputDifference[3] : 0);
        for (int i = 0; i < 4; i++)
        {
            Vector256.Store(Vector256.Load(tcsT + (i * 4)) * difference, target + (i * 4));
        }
    }
}
