using Lookahead.Api.Catalog;
using Lookahead.Api.Storage;
using Microsoft.AspNetCore.Http.Json;
using Microsoft.Extensions.Options;

namespace Lookahead.Api.Hosting;

/// <summary>
/// Registers the cold-store demo at start and points its alias at it. Idempotent: the id is a content hash,
/// so every start yields the same id, and the alias history only grows when the document changes.
/// A failure is logged, not fatal: the service still serves every other model, and /health/ready tells the story.
/// </summary>
public sealed class DemoModelSeeder(
    ModelCatalog catalog,
    IModelStore store,
    IOptions<DemoOptions> options,
    IOptions<JsonOptions> json,
    TimeProvider time,
    ILogger<DemoModelSeeder> logger) : IHostedService
{
    public async Task StartAsync(CancellationToken cancellationToken)
    {
        var demo = options.Value;
        if (!demo.Enabled)
        {
            return;
        }

        try
        {
            var path = Path.IsPathRooted(demo.DocumentPath) ? demo.DocumentPath : Path.Combine(AppContext.BaseDirectory, demo.DocumentPath);
            await using var file = File.OpenRead(path);
            var document = await System.Text.Json.JsonSerializer.DeserializeAsync<ModelDocumentDto>(file, json.Value.SerializerOptions, cancellationToken)
                ?? throw new InvalidDataException("the demo document is empty");
            var registration = await catalog.RegisterAsync(demo.Tenant, document, cancellationToken);
            if (!registration.Accepted)
            {
                var reasons = string.Join("; ", registration.Errors.Select(e => $"{e.Path}: {e.Reason}"));
                logger.LogError("Demo model rejected: {Errors}", reasons);
                return;
            }

            var alias = await store.SetAliasAsync(demo.Tenant, demo.Alias, registration.Id!, time.GetUtcNow(), null, cancellationToken);
            if (logger.IsEnabled(LogLevel.Information))
            {
                logger.LogInformation("Demo model {ModelId} registered ({Created}); alias {Alias} {AliasStatus}", registration.Id, registration.Created ? "new" : "already known", demo.Alias, alias.Status);
            }
        }
        catch (Exception ex) when (ex is not OperationCanceledException)
        {
            logger.LogError(ex, "Could not register the demo model");
        }
    }

    public Task StopAsync(CancellationToken cancellationToken) => Task.CompletedTask;
}
