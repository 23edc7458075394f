using Lookahead.Api.Catalog;
using Lookahead.Api.Http;
using Serilog;

namespace Lookahead.Api.Plans;

/// <summary>What a plan handler needs, bound as one [AsParameters] bundle.</summary>
public sealed record PlanServices(
    HttpRequest Request,
    ModelCatalog Catalog,
    RequestBodyReader Reader,
    PlanRunner Runner,
    IDiagnosticContext Log,
    CancellationToken CancellationToken);
