using Lookahead.Api;
using Lookahead.Api.Access;
using Lookahead.Api.Aliases;
using Lookahead.Api.Estimation;
using Lookahead.Api.Hosting;
using Lookahead.Api.Http;
using Lookahead.Api.Models;
using Lookahead.Api.Plans;
using Lookahead.Api.Replay;
using Lookahead.Api.Simulation;
using Lookahead.Api.Stations;

// Hosting/ holds what every feature stands on; each feature folder registers (when it has services) and maps itself.
var builder = WebApplication.CreateBuilder(args);
builder.AddLookaheadConfiguration(args);
builder.AddLookaheadLogging();
builder.Services.AddLookaheadHosting();
builder.Services.AddAccess();
builder.Services.AddModels().AddPlans().AddReplay().AddSimulation().AddEstimation().AddAliases().AddStations()
    .AddJsonContext(ApiJsonContext.Default);

var app = builder.Build();
app.UseLookaheadPipeline();
app.MapModelsApi();
app.MapPlansApi();
app.MapReplayApi();
app.MapSimulationApi();
app.MapEstimationApi();
app.MapAliasesApi();
app.MapStationsApi();
app.MapHostingEndpoints();
if (!AnonymousBindingGuard.Permits(app))
{
    return 1;
}

AnonymousBindingGuard.Watch(app);
app.Run();
return Environment.ExitCode;

/// <summary>Entry point; public and partial so tests can host it with WebApplicationFactory.</summary>
public partial class Program;
