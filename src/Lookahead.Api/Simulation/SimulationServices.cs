using Lookahead.Api.Catalog;
using Lookahead.Api.Http;
using Lookahead.Api.Plans;
using Serilog;

namespace Lookahead.Api.Simulation;

/// <summary>What the simulation handler needs, bound as one [AsParameters] bundle.</summary>
public sealed record SimulationServices(
    HttpRequest Request,
    ModelCatalog Catalog,
    RequestBodyReader Reader,
    IDiagnosticContext Log,
    PlanMetrics Metrics,
    CancellationToken CancellationToken);
