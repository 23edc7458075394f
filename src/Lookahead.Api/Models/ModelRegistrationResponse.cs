using Lookahead.Api.Http;

namespace Lookahead.Api.Models;

/// <summary>Answer to POST /v1/models. <see cref="DiscreteA"/> and <see cref="DiscreteB"/> are set when the plant was continuous.</summary>
public sealed record ModelRegistrationResponse(
    string Id,
    string? Name,
    bool Created,
    ModelDimensions Dimensions,
    double SampleTime,
    string TimeDomain,
    double[][]? DiscreteA,
    double[][]? DiscreteB,
    DiagnosticsDto Diagnostics,
    IReadOnlyList<WarningDto> Warnings);
