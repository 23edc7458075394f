using Lookahead.Api.Catalog;
using Lookahead.Api.Http;
using Lookahead.Api.Plans;
using Lookahead.Api.Storage;
using Microsoft.Extensions.Options;
using Serilog;

namespace Lookahead.Api.Stations;

/// <summary>What the station handlers need, bound as one [AsParameters] bundle.</summary>
public sealed record StationServices(
    HttpRequest Request,
    RequestBodyReader Reader,
    ModelCatalog Catalog,
    IModelStore Models,
    IStationStore Stations,
    StationLocks Locks,
    PlanRunner Runner,
    StationMetrics Metrics,
    StationLog Events,
    IDiagnosticContext Log,
    IOptions<StationOptions> Options,
    TimeProvider Time,
    CancellationToken CancellationToken);
