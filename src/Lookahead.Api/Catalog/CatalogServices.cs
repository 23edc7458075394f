using System.Text.Json.Nodes;
using Lookahead.Api.Http;
using Microsoft.OpenApi;

namespace Lookahead.Api.Catalog;

/// <summary>Registers the catalog: its options, metrics, cache, JSON metadata and the document's wire schema.</summary>
public static class CatalogServices
{
    public static IServiceCollection AddCatalog(this IServiceCollection services)
    {
        services.AddOptions<CacheOptions>().BindConfiguration(CacheOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        services.AddOptions<PlanningOptions>().BindConfiguration(PlanningOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        services.AddOptions<CompileBudgetOptions>().BindConfiguration(CompileBudgetOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        services.AddSingleton<CatalogMetrics>();
        services.AddSingleton<IModelCompilation, CoreModelCompilation>();
        services.AddSingleton<CompileBudget>();
        services.AddSingleton<CompiledModelCache>();
        services.AddSingleton<ModelCatalog>();
        services.ConfigureSwaggerGen(o =>
        {
            o.MapType<WeightDto>(() => new OpenApiSchema
            {
                Description = "A weight: a vector (its diagonal) or a square matrix (array of rows).",
                OneOf = [OpenApiSchemas.Vector(), OpenApiSchemas.Matrix()],
            });
            o.MapType<TerminalWeightDto>(() => new OpenApiSchema
            {
                Description = "Terminal weight: 'riccati' (default), 'stage', or an explicit n×n matrix.",
                OneOf =
                [
                    new OpenApiSchema { Type = JsonSchemaType.String, Enum = [JsonValue.Create("riccati"), JsonValue.Create("stage")] },
                    OpenApiSchemas.Matrix(),
                ],
            });
        });
        return services;
    }
}
