using Lookahead.Api.Composition;

// Composition lives in Composition/: configuration and logging, services, pipeline, endpoints.
var builder = WebApplication.CreateBuilder(args);
builder.AddLookaheadConfiguration(args);
builder.AddLookaheadLogging();
builder.Services.AddLookahead();

var app = builder.Build();
app.UseLookaheadPipeline();
app.MapLookaheadEndpoints();
app.Run();

/// <summary>Entry point; public and partial so tests can host it with WebApplicationFactory.</summary>
public partial class Program;
