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
                Description = "A weight: a vector (its diagonal) or a square matrix (array of rows). The shape given is kept: reading the model back returns it as sent.",
                OneOf = [Titled(OpenApiSchemas.Vector(), "diagonal", "The diagonal of the weight, one entry per signal."), Titled(OpenApiSchemas.Matrix(), "matrix", "The full symmetric weight as an array of rows.")],
            });
            o.MapType<TerminalWeightDto>(() => new OpenApiSchema
            {
                Description = "Terminal weight: 'riccati' (default), 'stage', or an explicit n×n matrix.",
                OneOf =
                [
                    new OpenApiSchema
                    {
                        Title = "named",
                        Type = JsonSchemaType.String,
                        Enum = [JsonValue.Create("riccati"), JsonValue.Create("stage")],
                        Description = "riccati: the stabilising solution of the discrete algebraic Riccati equation; stage: CᵀQC.",
                    },
                    Titled(OpenApiSchemas.Matrix(), "matrix", "An explicit n×n terminal weight as an array of rows."),
                ],
            });
            o.RequireMembers<ModelDocumentDto>("plant", "cost");
            o.RequireMembers<PlantDto>("a", "b", "sampleTime", "timeDomain");
            o.RequireMembers<CostDto>("horizon", "outputWeight", "inputWeight");
            o.RequireMembers<EstimatorDto>("processNoise", "measurementNoise");
            o.CloseSet<PlantDto>("timeDomain", TimeDomains);
            o.CloseSet<EstimatorDto>("disturbanceModel", DisturbanceModels);
        });
        return services;
    }

    /// <summary>The wire names of a plant's time domain.</summary>
    public static IReadOnlyList<string> TimeDomains { get; } = ["discrete", "continuous"];

    /// <summary>Where an estimator's integrating disturbances enter.</summary>
    public static IReadOnlyList<string> DisturbanceModels { get; } = ["output", "input", "none"];

    private static OpenApiSchema Titled(OpenApiSchema schema, string title, string description)
    {
        schema.Title = title;
        schema.Description = description;
        return schema;
    }
}
