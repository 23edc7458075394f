using Lookahead.Api.Catalog;
using Lookahead.Api.Http;
using Microsoft.Extensions.Options;
using Serilog;

namespace Lookahead.Api.Replay;

/// <summary>What the replay handler needs, bound as one [AsParameters] bundle.</summary>
public sealed record ReplayServices(
    HttpContext Context,
    ModelCatalog Catalog,
    ReplayRunner Runner,
    IOptions<RequestLimitsOptions> Limits,
    IDiagnosticContext Log,
    CancellationToken CancellationToken);
