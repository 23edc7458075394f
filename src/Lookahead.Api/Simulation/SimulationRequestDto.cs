namespace Lookahead.Api.Simulation;

/// <summary>Body of POST …/simulate: a closed-loop run that applies each plan's first move.</summary>
public sealed record SimulationRequestDto(
    double[]? InitialState,
    int? Steps,
    ReferenceChangeDto[]? References,
    TruePlantDto? TruePlant,
    double[][]? Disturbances,
    double[]? PreviousInput);

/// <summary>From step <see cref="FromStep"/> on, track <see cref="Reference"/>.</summary>
public sealed record ReferenceChangeDto(int? FromStep, double[]? Reference);

/// <summary>The plant that really moves, when it differs from the model (same n and m).</summary>
public sealed record TruePlantDto(double[][]? A, double[][]? B, string? TimeDomain);
