using Lookahead.Api.Catalog;
using Lookahead.Api.Http;
using Serilog;

namespace Lookahead.Api.Estimation;

/// <summary>What the estimate handler needs, bound as one [AsParameters] bundle.</summary>
public sealed record EstimationServices(
    HttpRequest Request,
    ModelCatalog Catalog,
    RequestBodyReader Reader,
    IDiagnosticContext Log,
    CancellationToken CancellationToken);
