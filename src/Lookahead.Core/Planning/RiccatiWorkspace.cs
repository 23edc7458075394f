namespace Lookahead.Core.Planning;

/// <summary>
/// Scratch and per-stage factors of <see cref="RiccatiNewtonStep"/>, on the pinned heap. Blocks are row-major with
/// every row padded to a whole number of 4-double vectors (<see cref="Pad"/>); the padding stays zero, so a row can
/// be processed a vector at a time without a scalar tail. One workspace belongs to one solve at a time.
/// </summary>
internal sealed class RiccatiWorkspace
{
    /// <param name="tiled">Whether the small-model tiles are needed; without them their arrays stay empty.</param>
    public RiccatiWorkspace(int n, int m, int nv, int ns, int horizon, bool tiled = false)
    {
        int np = Pad(n);
        int mp = Pad(m);
        int sp = Pad(ns);
        int kp = np + (nv > 0 ? mp : 0);
        Pxx = Pinned(n * np);
        NextPxx = Pinned(n * np);
        Pxv = Pinned(n * mp);
        Pvv = Pinned(m * mp);
        Mx = Pinned(n * sp);
        NextMx = Pinned(n * sp);
        Mv = Pinned(m * sp);
        Yx = Pinned(n * mp);
        Yv = Pinned(m * mp);
        FxT = Pinned(m * np);
        Rest = Pinned(m * mp);
        Rate = Pinned(m * mp);
        Coupling = Pinned(m * sp);
        W = Pinned(ns * sp);
        Z = Pinned(m * mp);
        Work = Pinned(n * np);
        Factor = Pinned(horizon * m * m);
        Gain = Pinned(horizon * m * kp);
        SlackGain = Pinned(horizon * m * sp);
        GainTransposed = Pinned(horizon * kp * mp);
        SlackGainTransposed = Pinned(horizon * sp * mp);
        Feedforward = Pinned(horizon * m);
        SlackSystem = Pinned(ns * ns);
        Costate = Pinned(np);
        NextCostate = Pinned(np);
        CostateV = Pinned(mp);
        Stage = Pinned(mp);
        SlackVector = Pinned(Math.Max(sp, 4));
        StepState = Pinned(np);
        NextStepState = Pinned(np);
        StepInput = Pinned(mp);
        PreviousStepInput = Pinned(mp);
        StepSlack = Pinned(Math.Max(sp, 4));
        Tiles = Pinned(tiled ? RiccatiNewtonStep.TileCount * 16 : 0);
        TiledStages = Pinned(tiled ? horizon * RiccatiNewtonStep.StageBlock : 0);
        TiledFeedforward = Pinned(tiled ? horizon * 4 : 0);
    }

    /// <summary>Row length rounded up to a multiple of 4 (one 256-bit vector of doubles).</summary>
    public static int Pad(int length) => (length + 3) & ~3;

    public double[] Pxx { get; }
    public double[] NextPxx { get; }
    public double[] Pxv { get; }
    public double[] Pvv { get; }
    public double[] Mx { get; }
    public double[] NextMx { get; }
    public double[] Mv { get; }
    public double[] Yx { get; }
    public double[] Yv { get; }
    public double[] FxT { get; }
    public double[] Rest { get; }
    public double[] Rate { get; }
    public double[] Coupling { get; }
    public double[] W { get; }
    public double[] Z { get; }
    public double[] Work { get; }

    /// <summary>Per stage: Cholesky factor of G_k (m×m, unpadded).</summary>
    public double[] Factor { get; }

    /// <summary>Per stage: K_k = G_k⁻¹F_kᵀ, rows [K_x (padded n) | K_v (padded m)].</summary>
    public double[] Gain { get; }

    /// <summary>Per stage: G_k⁻¹B̃ᵀM_{k+1} (m rows, padded ns).</summary>
    public double[] SlackGain { get; }

    /// <summary>Per stage: K_kᵀ (padded n + padded m rows of padded m), for the forward pass.</summary>
    public double[] GainTransposed { get; }

    /// <summary>Per stage: (G_k⁻¹B̃ᵀM_{k+1})ᵀ (padded ns rows of padded m).</summary>
    public double[] SlackGainTransposed { get; }

    /// <summary>Per stage: G_k⁻¹g_k of the last solve.</summary>
    public double[] Feedforward { get; }

    /// <summary>Cholesky factor of the reduced slack system (ns×ns).</summary>
    public double[] SlackSystem { get; }

    public double[] Costate { get; }
    public double[] NextCostate { get; }
    public double[] CostateV { get; }
    public double[] Stage { get; }
    public double[] SlackVector { get; }
    public double[] StepState { get; }
    public double[] NextStepState { get; }
    public double[] StepInput { get; }
    public double[] PreviousStepInput { get; }
    public double[] StepSlack { get; }

    /// <summary>4×4 scratch tiles of the small-model recursion (<see cref="RiccatiNewtonStep"/>).</summary>
    public double[] Tiles { get; }

    /// <summary>Per stage of the small-model recursion: the tiles its solve reads (see <see cref="RiccatiNewtonStep"/>).</summary>
    public double[] TiledStages { get; }

    /// <summary>Per stage of the small-model recursion: G_k⁻¹g_k of the last solve, 4 wide.</summary>
    public double[] TiledFeedforward { get; }

    private static double[] Pinned(int length) => GC.AllocateArray<double>(Math.Max(length, 1), pinned: true);
}
