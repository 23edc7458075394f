using Lookahead.Api.Catalog;
using Lookahead.Api.Http;
using Lookahead.Api.Plans;
using Lookahead.Api.Storage;

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
    TimeProvider Time,
    CancellationToken CancellationToken);
