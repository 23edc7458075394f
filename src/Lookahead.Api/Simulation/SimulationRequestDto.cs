namespace Lookahead.Api.Simulation;

/// <summary>Body of POST …/simulate: a closed-loop run that applies each plan's first move.</summary>
/// <param name="MeasuredDisturbances">Schedule of measured disturbances (q each): they drive the true plant through E and each plan holds the current one.</param>
/// <param name="OutputDisturbance">Schedule of an unmeasured offset on the true outputs (p each), a step load the model does not know.</param>
/// <param name="Feedback">"state" (the default: plan from the true state) or "estimate" (plan from the model estimator's estimate from the measurements).</param>
/// <param name="MeasurementNoise">Seeded Gaussian noise on each measurement.</param>
public sealed record SimulationRequestDto(
    double[]? InitialState,
    int? Steps,
    ReferenceChangeDto[]? References,
    TruePlantDto? TruePlant,
    double[][]? Disturbances,
    double[]? PreviousInput,
    MeasuredDisturbanceChangeDto[]? MeasuredDisturbances = null,
    OutputDisturbanceChangeDto[]? OutputDisturbance = null,
    string? Feedback = null,
    MeasurementNoiseDto? MeasurementNoise = null);

/// <summary>From step <see cref="FromStep"/> on, track <see cref="Reference"/>.</summary>
public sealed record ReferenceChangeDto(int? FromStep, double[]? Reference);

/// <summary>From step <see cref="FromStep"/> on, the measured disturbances are <see cref="Disturbance"/> (q, engineering units with an operating point).</summary>
public sealed record MeasuredDisturbanceChangeDto(int? FromStep, double[]? Disturbance);

/// <summary>From step <see cref="FromStep"/> on, <see cref="Offset"/> (p, an offset in output units) is added to the true outputs.</summary>
public sealed record OutputDisturbanceChangeDto(int? FromStep, double[]? Offset);

/// <summary>Gaussian measurement noise: one standard deviation per output (≥ 0) and the generator's seed (0 when omitted).</summary>
public sealed record MeasurementNoiseDto(double[]? StandardDeviation, int? Seed);

/// <summary>The plant that really moves, when it differs from the model (same n and m).</summary>
public sealed record TruePlantDto(double[][]? A, double[][]? B, string? TimeDomain);
