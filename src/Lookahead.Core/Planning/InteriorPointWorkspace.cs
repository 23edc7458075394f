namespace Lookahead.Core.Planning;

/// <summary>
/// Every buffer one interior-point solve needs, sized once for a model so that a solve allocates nothing.
/// A workspace belongs to one solve at a time (pooled by <see cref="InteriorPointProblem"/>). Layouts are row-major;
/// per-stage blocks are stored back to back, stage k at offset k × block size.
/// </summary>
internal sealed class InteriorPointWorkspace
{
    public InteriorPointWorkspace(int n, int m, int ns, int horizon, int maxRows, RiccatiWorkspace riccati)
    {
        Riccati = riccati;
        int nm = horizon * m;
        Inputs = Pinned(nm);
        ScaledPreviousInput = Pinned(m);
        ScaledTargetInput = Pinned(m);
        States = Pinned((horizon + 1) * n);
        Slacks = Pinned(ns);
        SoftOutputs = Pinned((horizon + 1) * ns);
        StepInputs = Pinned(nm);
        StepStates = Pinned((horizon + 1) * n);
        StepSlacks = Pinned(ns);
        StepSoftOutputs = Pinned((horizon + 1) * ns);

        RowSlack = Pinned(maxRows);
        Multiplier = Pinned(maxRows);
        RowValue = Pinned(maxRows);
        Barrier = Pinned(maxRows);
        InverseSlack = Pinned(maxRows);
        Shift = Pinned(maxRows);
        StepRow = Pinned(maxRows);
        StepRowSlack = Pinned(maxRows);
        StepMultiplier = Pinned(maxRows);
        AffineRowSlack = Pinned(maxRows);
        AffineMultiplier = Pinned(maxRows);
        PolishMultiplier = Pinned(maxRows);
        Guess = new bool[maxRows];
        SavedInputs = Pinned(nm);
        SavedSlacks = Pinned(ns);

        ObjectiveInputGradient = Pinned(nm);
        ObjectiveStateGradient = Pinned((horizon + 1) * n);
        ObjectiveSlackGradient = Pinned(ns);
        InputGradient = Pinned(nm);
        StateGradient = Pinned((horizon + 1) * n);
        SlackGradient = Pinned(ns);
        ReducedGradient = Pinned(nm);

        InputBarrier = Pinned(nm);
        RateBarrier = Pinned(nm);
        OutputBarrierSum = Pinned((horizon + 1) * ns);
        OutputBarrierDifference = Pinned((horizon + 1) * ns);
        SlackBarrier = Pinned(ns);

        CostateX = Pinned(n);
        NextCostateX = Pinned(n);
        StageVector = Pinned(Math.Max(m, Math.Max(n, ns)));
        OutputTerm = Pinned(n);
        Coefficients = Pinned(ns);
    }

    /// <summary>Arrays on the pinned heap, so the Riccati kernels can address them without fixing them per call.</summary>
    private static double[] Pinned(int length) => GC.AllocateArray<double>(length, pinned: true);

    // Primal point: u (N×m), x (x_0 … x_N), ε, and the softly limited outputs y_{k,s} = c_sᵀx_k.
    public double[] Inputs { get; }

    /// <summary>u_{−1} and u_s of the current solve in the iteration's scaled inputs.</summary>
    public double[] ScaledPreviousInput { get; }

    public double[] ScaledTargetInput { get; }
    public double[] States { get; }
    public double[] Slacks { get; }
    public double[] SoftOutputs { get; }
    public double[] StepInputs { get; }
    public double[] StepStates { get; }
    public double[] StepSlacks { get; }
    public double[] StepSoftOutputs { get; }

    // One entry per inequality row (layout in InteriorPointProblem.RowLayout).
    public double[] RowSlack { get; }
    public double[] Multiplier { get; }
    public double[] RowValue { get; }
    public double[] Barrier { get; }
    public double[] InverseSlack { get; }
    public double[] Shift { get; }
    public double[] StepRow { get; }
    public double[] StepRowSlack { get; }
    public double[] StepMultiplier { get; }
    public double[] AffineRowSlack { get; }
    public double[] AffineMultiplier { get; }

    // Polishing: multipliers of the guessed active rows, the guess itself, and the point to return to if it fails.
    public double[] PolishMultiplier { get; }
    public bool[] Guess { get; }
    public double[] SavedInputs { get; }
    public double[] SavedSlacks { get; }
    public bool GuessChanged { get; set; }

    // Stagewise gradients: of the objective alone, and of the Lagrangian with some multiplier vector.
    public double[] ObjectiveInputGradient { get; }
    public double[] ObjectiveStateGradient { get; }
    public double[] ObjectiveSlackGradient { get; }
    public double[] InputGradient { get; }
    public double[] StateGradient { get; }
    public double[] SlackGradient { get; }
    public double[] ReducedGradient { get; }

    // Barrier weights λ/s summed per variable.
    public double[] InputBarrier { get; }
    public double[] RateBarrier { get; }
    public double[] OutputBarrierSum { get; }
    public double[] OutputBarrierDifference { get; }
    public double[] SlackBarrier { get; }

    /// <summary>The Riccati recursion's own padded scratch and per-stage factors.</summary>
    public RiccatiWorkspace Riccati { get; }

    // Scratch of the adjoint recursion and the stage loops.
    public double[] CostateX { get; }
    public double[] NextCostateX { get; }
    public double[] StageVector { get; }
    public double[] OutputTerm { get; }
    public double[] Coefficients { get; }
}
