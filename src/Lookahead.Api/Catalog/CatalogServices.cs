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
        services.AddSingleton<RegistrationIntake>();
        services.AddSingleton<CompiledModelCache>();
        services.AddSingleton<ModelCatalog>();
        services.ConfigureSwaggerGen(o =>
        {
            o.MapType<WeightDto>(() => new OpenApiSchema
            {
                Description = "A weight: a square matrix (array of rows) or a vector (its diagonal). The shape given is kept: reading the model back returns it as sent.",

                // The matrix comes first: generators that type a union by its first alternative then keep matrices.
                OneOf = [Titled(OpenApiSchemas.Matrix(), "matrix", "The full symmetric weight as an array of rows."), Titled(OpenApiSchemas.Vector(), "diagonal", "The diagonal of the weight, one entry per signal.")],
            });
            o.MapType<TerminalWeightDto>(() => new OpenApiSchema
            {
                Description = "Terminal weight: an explicit n×n matrix, or 'riccati' (the default, written back when omitted) or 'stage'.",
                OneOf =
                [
                    Titled(OpenApiSchemas.Matrix(), "matrix", "An explicit n×n terminal weight as an array of rows."),
                    new OpenApiSchema
                    {
                        Title = "named",
                        Type = JsonSchemaType.String,
                        Enum = [JsonValue.Create("riccati"), JsonValue.Create("stage")],
                        Description = "riccati: the stabilising solution of the discrete algebraic Riccati equation; stage: CᵀQC.",
                    },
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
