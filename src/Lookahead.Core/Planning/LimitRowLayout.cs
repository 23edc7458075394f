namespace Lookahead.Core.Planning;

/// <summary>
/// Where each kind of inequality row starts in the interior-point solver's per-row arrays for one request. Blocks are
/// step-major: input minima (k = 0 … N−1, then the inputs that have one), input maxima, rate minima and maxima
/// (from <see cref="FirstRateStep"/>), output minima and maxima (k = 1 … N, then the soft outputs that have one) and
/// the slack bounds ε_s ≥ 0.
/// </summary>
internal readonly struct LimitRowLayout
{
    public LimitRowLayout(int horizon, int inputLow, int inputHigh, int rateLow, int rateHigh, int outputLow, int outputHigh, int slacks, bool firstRateRows)
    {
        FirstRateStep = firstRateRows ? 0 : 1;
        int rateSteps = Math.Max(horizon - FirstRateStep, 0);
        InputLow = 0;
        InputHigh = InputLow + (horizon * inputLow);
        RateLow = InputHigh + (horizon * inputHigh);
        RateHigh = RateLow + (rateSteps * rateLow);
        OutputLow = RateHigh + (rateSteps * rateHigh);
        OutputHigh = OutputLow + (horizon * outputLow);
        Slack = OutputHigh + (horizon * outputHigh);
        Count = Slack + slacks;
    }

    /// <summary>0 when the Δu_0 rows (from u_{−1}) are in force, else 1.</summary>
    public int FirstRateStep { get; }

    public int InputLow { get; }

    public int InputHigh { get; }

    public int RateLow { get; }

    public int RateHigh { get; }

    public int OutputLow { get; }

    public int OutputHigh { get; }

    public int Slack { get; }

    public int Count { get; }
}
