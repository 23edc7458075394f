namespace Lookahead.Core.Models;

/// <summary>
/// A plant-and-cost model exactly as a client described it. Nothing here is validated yet:
/// <see cref="Validation.ModelValidator"/> checks it and <see cref="Planning.ModelCompiler"/> compiles it.
/// Matrices are arrays of rows.
/// </summary>
/// <param name="OperatingPoint">
/// The engineering values at which the model was linearised. The model itself stays in deviations from them; with an
/// operating point every value a client sends or receives (states, references, previous inputs, limits, targets,
/// trajectories) is in engineering units. Null: everything is in the model's own (deviation) units.
/// </param>
/// <param name="Estimator">An offset-free state estimator designed at registration (see <see cref="Estimation.EstimatorSpec"/>); null for none.</param>
public sealed record ModelDocument(
    string? Name,
    PlantSpec Plant,
    CostSpec Cost,
    LimitsSpec? Limits = null,
    LabelsSpec? Labels = null,
    OperatingPointSpec? OperatingPoint = null,
    Estimation.EstimatorSpec? Estimator = null);

/// <summary>Engineering values of the states (n), inputs (m), outputs (p) and measured disturbances (q) at the operating point; a missing part is zero.</summary>
public sealed record OperatingPointSpec(double[]? State = null, double[]? Input = null, double[]? Output = null, double[]? Disturbance = null);

/// <summary>Whether <see cref="PlantSpec.A"/> and <see cref="PlantSpec.B"/> describe x' = Ax + Bu or x(k+1) = Ax(k) + Bu(k).</summary>
public enum TimeDomain
{
    Discrete,
    Continuous,
}

/// <summary>x(k+1) = A x(k) + B u(k), y = C x; a continuous plant is discretised by zero-order hold at <see cref="SampleTime"/>.</summary>
/// <param name="A">n×n state matrix.</param>
/// <param name="B">n×m input matrix.</param>
/// <param name="C">p×n output matrix; null means the identity (outputs are the states).</param>
/// <param name="SampleTime">Seconds between moves, &gt; 0.</param>
/// <param name="TimeDomain">How to read A, B and E.</param>
/// <param name="E">
/// n×q: measured disturbances v (outdoor temperature, throughput) with x(k+1) = A x + B u + E v; a continuous plant
/// holds B and E together. Null: no measured disturbances.
/// </param>
public sealed record PlantSpec(
    double[][] A,
    double[][] B,
    double[][]? C,
    double SampleTime,
    TimeDomain TimeDomain = TimeDomain.Discrete,
    double[][]? E = null);

/// <summary>The quadratic cost over the horizon; see <see cref="Planning.CompiledModel"/> for the formula.</summary>
/// <param name="Horizon">Number of moves N, ≥ 1.</param>
/// <param name="OutputWeight">Q, p×p, positive semidefinite.</param>
/// <param name="InputWeight">R, m×m, positive definite.</param>
/// <param name="InputRateWeight">S, m×m, positive semidefinite; null means zero (no move suppression).</param>
/// <param name="TerminalWeight">P; null means <see cref="TerminalWeightKind.Riccati"/>.</param>
public sealed record CostSpec(
    int Horizon,
    WeightSpec OutputWeight,
    WeightSpec InputWeight,
    WeightSpec? InputRateWeight = null,
    TerminalWeightSpec? TerminalWeight = null);

/// <summary>A weight given either as a full symmetric matrix or as the diagonal of one.</summary>
public sealed record WeightSpec
{
    private WeightSpec(double[]? diagonal, double[][]? matrix)
    {
        Diagonal = diagonal;
        Matrix = matrix;
    }

    /// <summary>Set when the weight was given as a vector.</summary>
    public double[]? Diagonal { get; }

    /// <summary>Set when the weight was given as a matrix.</summary>
    public double[][]? Matrix { get; }

    public static WeightSpec FromDiagonal(double[] diagonal) => new(diagonal, null);

    public static WeightSpec FromMatrix(double[][] matrix) => new(null, matrix);

    /// <summary>Side length of the square weight.</summary>
    public int Size => Diagonal?.Length ?? Matrix!.Length;
}

/// <summary>How the terminal weight P on (x_N − x_s) is chosen.</summary>
public enum TerminalWeightKind
{
    /// <summary>The stabilising solution of the discrete algebraic Riccati equation for (A, B, CᵀQC, R).</summary>
    Riccati,

    /// <summary>The stage weight CᵀQC.</summary>
    Stage,

    /// <summary>An explicit n×n positive semidefinite matrix.</summary>
    Explicit,
}

/// <summary>Terminal weight choice; <see cref="Matrix"/> is set only for <see cref="TerminalWeightKind.Explicit"/>.</summary>
public sealed record TerminalWeightSpec(TerminalWeightKind Kind, double[][]? Matrix = null)
{
    public static TerminalWeightSpec Riccati { get; } = new(TerminalWeightKind.Riccati);

    public static TerminalWeightSpec Stage { get; } = new(TerminalWeightKind.Stage);
}

/// <summary>
/// Optional limits. Every array is per input (length m) or per output (length p); a null entry is unbounded.
/// Input and input-rate limits are hard; output limits are soft, penalised by <see cref="OutputViolationWeight"/>.
/// </summary>
public sealed record LimitsSpec(
    double?[]? InputMin = null,
    double?[]? InputMax = null,
    double?[]? InputRateMin = null,
    double?[]? InputRateMax = null,
    double?[]? OutputMin = null,
    double?[]? OutputMax = null,
    double[]? OutputViolationWeight = null);

/// <summary>Human names for states, inputs and outputs, used by CSV replay and charts, and their units.</summary>
public sealed record LabelsSpec(string[]? States = null, string[]? Inputs = null, string[]? Outputs = null, UnitsSpec? Units = null, string[]? Disturbances = null);

/// <summary>Free-text units (°C, %, bar) per state, input and output, shown on chart axes and in the model's details.</summary>
public sealed record UnitsSpec(string[]? States = null, string[]? Inputs = null, string[]? Outputs = null, string[]? Disturbances = null);
