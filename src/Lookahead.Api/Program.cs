using Lookahead.Api.Aliases;
using Lookahead.Api.Hosting;
using Lookahead.Api.Models;
using Lookahead.Api.Plans;
using Lookahead.Api.Replay;
using Lookahead.Api.Simulation;

// Hosting/ holds what every feature stands on; each feature folder registers and maps itself.
var builder = WebApplication.CreateBuilder(args);
builder.AddLookaheadConfiguration(args);
builder.AddLookaheadLogging();
builder.Services.AddLookaheadHosting();
builder.Services.AddModels().AddPlans().AddReplay().AddSimulation().AddAliases();

var app = builder.Build();
app.UseLookaheadPipeline();
app.MapModelsApi();
app.MapPlansApi();
app.MapReplayApi();
app.MapSimulationApi();
app.MapAliasesApi();
app.MapHostingEndpoints();
app.Run();

/// <summary>Entry point; public and partial so tests can host it with WebApplicationFactory.</summary>
public partial class Program;
