using Lookahead.Api.Catalog;
using Lookahead.Api.Http;

namespace Lookahead.Api.Models;

/// <summary>Answer to GET /v1/models/{id}: the stored (canonical) document and what compiling it revealed.</summary>
public sealed record ModelDetailsResponse(
    string Id,
    DateTimeOffset RegisteredAt,
    ModelDocumentDto Document,
    ModelDimensions Dimensions,
    double[][]? DiscreteA,
    double[][]? DiscreteB,
    DiagnosticsDto Diagnostics,
    IReadOnlyList<WarningDto> Warnings);
