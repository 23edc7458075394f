using System.Text.Json.Serialization;

namespace Lookahead.Api.Catalog;

/// <summary>A plant-and-cost model as sent by a client. Every field is optional here so that a missing one is reported by path, not by the parser.</summary>
/// <param name="OperatingPoint">Engineering values the model was linearised at; with it, every value sent or received is in engineering units.</param>
/// <param name="Estimator">An offset-free state estimator designed at registration; plans then accept its estimate instead of a measured state.</param>
public sealed record ModelDocumentDto(
    string? Name,
    PlantDto? Plant,
    CostDto? Cost,
    LimitsDto? Limits,
    LabelsDto? Labels,
    OperatingPointDto? OperatingPoint = null,
    EstimatorDto? Estimator = null);

/// <summary>
/// Noise covariances for the steady-state Kalman gain — processNoise over the augmented state [x; d] (n + n_d
/// entries or that square matrix), measurementNoise over the outputs (p or p×p) — and where the integrating
/// disturbances enter: "output" (the default: n_d = p), "input" (n_d = m) or "none".
/// </summary>
public sealed record EstimatorDto(WeightDto? ProcessNoise, WeightDto? MeasurementNoise, string? DisturbanceModel);

/// <summary>x_op (n), u_op (m), y_op (p) in engineering units; a missing part is zero.</summary>
public sealed record OperatingPointDto(double[]? State, double[]? Input, double[]? Output, double[]? Disturbance = null)
{
    [JsonIgnore]
    public bool IsEmpty => State is null && Input is null && Output is null && Disturbance is null;
}

/// <summary>x(k+1) = A x(k) + B u(k) + E v(k) (or x' = Ax + Bu + Ev when continuous), y = C x. Matrices are arrays of rows; E (n×q) is optional: measured disturbances v.</summary>
public sealed record PlantDto(
    double[][]? A,
    double[][]? B,
    double[][]? C,
    double? SampleTime,
    string? TimeDomain,
    double[][]? E = null);

public sealed record CostDto(
    int? Horizon,
    WeightDto? OutputWeight,
    WeightDto? InputWeight,
    WeightDto? InputRateWeight,
    TerminalWeightDto? TerminalWeight);

/// <summary>Per input (m) or per output (p); a null entry is unbounded.</summary>
public sealed record LimitsDto(
    double?[]? InputMin,
    double?[]? InputMax,
    double?[]? InputRateMin,
    double?[]? InputRateMax,
    double?[]? OutputMin,
    double?[]? OutputMax,
    double[]? OutputViolationWeight)
{
    [JsonIgnore]
    public bool IsEmpty => InputMin is null && InputMax is null && InputRateMin is null && InputRateMax is null
        && OutputMin is null && OutputMax is null && OutputViolationWeight is null;
}

public sealed record LabelsDto(string[]? States, string[]? Inputs, string[]? Outputs, UnitsDto? Units = null, string[]? Disturbances = null)
{
    [JsonIgnore]
    public bool IsEmpty => States is null && Inputs is null && Outputs is null && Units is null && Disturbances is null;
}

/// <summary>Free-text units per state, input and output (°C, %, bar), shown on chart axes and in the model's details.</summary>
public sealed record UnitsDto(string[]? States, string[]? Inputs, string[]? Outputs, string[]? Disturbances = null)
{
    [JsonIgnore]
    public bool IsEmpty => States is null && Inputs is null && Outputs is null && Disturbances is null;
}
