namespace Lookahead.Client;

/// <summary>
/// A plant-and-cost model as registered: x(k+1) = A x + B u + E v (or its continuous form), y = C x, a quadratic cost
/// over <see cref="CostSettings.Horizon"/> moves, limits, labels, an operating point and an optional estimator.
/// </summary>
public sealed record ModelDocument
{
    public string? Name { get; init; }

    public required PlantSettings Plant { get; init; }

    public required CostSettings Cost { get; init; }

    public LimitSettings? Limits { get; init; }

    public LabelSettings? Labels { get; init; }

    /// <summary>With it, every value sent or received is in engineering units.</summary>
    public OperatingPointSettings? OperatingPoint { get; init; }

    public EstimatorSettings? Estimator { get; init; }
}

/// <summary>The plant's matrices (arrays of rows), its sample time in seconds and its time domain ("discrete" or "continuous").</summary>
public sealed record PlantSettings
{
    public required double[][] A { get; init; }

    public required double[][] B { get; init; }

    /// <summary>Omitted: the identity.</summary>
    public double[][]? C { get; init; }

    /// <summary>Measured disturbances, n×q.</summary>
    public double[][]? E { get; init; }

    public required double SampleTime { get; init; }

    public required string TimeDomain { get; init; }
}

public sealed record CostSettings
{
    public required int Horizon { get; init; }

    public required Weight OutputWeight { get; init; }

    public required Weight InputWeight { get; init; }

    public Weight? InputRateWeight { get; init; }

    /// <summary>Omitted: <see cref="TerminalWeight.Riccati"/>.</summary>
    public TerminalWeight? TerminalWeight { get; init; }
}

/// <summary>Per input (m) or per output (p); a null entry is unbounded.</summary>
public sealed record LimitSettings
{
    public double?[]? InputMin { get; init; }

    public double?[]? InputMax { get; init; }

    public double?[]? InputRateMin { get; init; }

    public double?[]? InputRateMax { get; init; }

    public double?[]? OutputMin { get; init; }

    public double?[]? OutputMax { get; init; }

    public double[]? OutputViolationWeight { get; init; }
}

public sealed record LabelSettings
{
    public string[]? States { get; init; }

    public string[]? Inputs { get; init; }

    public string[]? Outputs { get; init; }

    public string[]? Disturbances { get; init; }

    public UnitSettings? Units { get; init; }
}

/// <summary>Free-text units per state, input, output and disturbance, shown on chart axes.</summary>
public sealed record UnitSettings
{
    public string[]? States { get; init; }

    public string[]? Inputs { get; init; }

    public string[]? Outputs { get; init; }

    public string[]? Disturbances { get; init; }
}

/// <summary>Engineering values the model was linearised at; a missing part is zero.</summary>
public sealed record OperatingPointSettings
{
    public double[]? State { get; init; }

    public double[]? Input { get; init; }

    public double[]? Output { get; init; }

    public double[]? Disturbance { get; init; }
}

/// <summary>Noise covariances for the steady-state Kalman gain and where the integrating disturbances enter ("output", "input" or "none").</summary>
public sealed record EstimatorSettings
{
    public required Weight ProcessNoise { get; init; }

    public required Weight MeasurementNoise { get; init; }

    public string? DisturbanceModel { get; init; }
}
