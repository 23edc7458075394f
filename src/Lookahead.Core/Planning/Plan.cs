namespace Lookahead.Core.Planning;

/// <summary>
/// The optimal input sequence and its predicted trajectory. Arrays are row-major:
/// <see cref="Inputs"/> is N×m, <see cref="States"/> (N+1)×n, <see cref="Outputs"/> (N+1)×p.
/// </summary>
public sealed class Plan
{
    internal Plan(int horizon, int stateCount, int inputCount, int outputCount)
    {
        Horizon = horizon;
        StateCount = stateCount;
        InputCount = inputCount;
        OutputCount = outputCount;
        Inputs = new double[horizon * inputCount];
        States = new double[(horizon + 1) * stateCount];
        Outputs = new double[(horizon + 1) * outputCount];
    }

    public int Horizon { get; }

    public int StateCount { get; }

    public int InputCount { get; }

    public int OutputCount { get; }

    public PlanStatus Status { get; internal set; } = PlanStatus.Optimal;

    /// <summary>u_0 … u_{N−1}, row-major N×m.</summary>
    public double[] Inputs { get; }

    /// <summary>x_0 … x_N, row-major (N+1)×n; x_0 is the measured state.</summary>
    public double[] States { get; }

    /// <summary>y_0 … y_N, row-major (N+1)×p.</summary>
    public double[] Outputs { get; }

    /// <summary>
    /// J as defined on <see cref="CompiledModel"/>, including the constant x_0 term, evaluated on this plan's
    /// trajectory. It never includes the soft-limit penalty; that is <see cref="SoftLimitPenalty"/>.
    /// </summary>
    public double Cost { get; internal set; }

    /// <summary>
    /// Σ_j (ρ ε_j + w_j ε_j²) at the solution: the price the limited solve paid for the soft output limits it could
    /// not meet (ε_j the largest violation of output j, w_j its violation weight, ρ the linear weight used).
    /// 0 when no soft limit is exceeded beyond rounding (no <see cref="WarningCode.SoftOutputLimitExceeded"/> warning)
    /// or the model has none. The solve minimised <see cref="Cost"/> plus this.
    /// </summary>
    public double SoftLimitPenalty { get; internal set; }

    /// <summary>Set when the request carried a reference.</summary>
    public SteadyStateTarget? Target { get; internal set; }

    public IReadOnlyList<ActiveLimit> ActiveLimits { get; internal set; } = [];

    /// <summary>Active-set iterations taken (0 for an unconstrained plan).</summary>
    public int Iterations { get; internal set; }

    /// <summary>Largest amount by which a predicted output exceeds a soft output limit (0 when none is violated).</summary>
    public double MaxOutputViolation { get; internal set; }

    /// <summary>Anything that is not a clean optimum, as codes with their numbers; a status other than optimal always has one.</summary>
    public IReadOnlyList<Warning> Warnings { get; internal set; } = [];

    public ReadOnlySpan<double> Input(int step) => Inputs.AsSpan(step * InputCount, InputCount);

    public ReadOnlySpan<double> State(int step) => States.AsSpan(step * StateCount, StateCount);

    public ReadOnlySpan<double> Output(int step) => Outputs.AsSpan(step * OutputCount, OutputCount);
}
