using System.Text.Json.Nodes;
using Lookahead.Api.Contracts;
using Microsoft.OpenApi;

namespace Lookahead.Api.Composition;

/// <summary>Swashbuckle setup. Types with custom JSON converters get their real wire schema here.</summary>
public static class OpenApiExtensions
{
    public const string DocumentName = "v1";

    public static IServiceCollection AddLookaheadOpenApi(this IServiceCollection services)
    {
        services.AddEndpointsApiExplorer();
        services.AddSwaggerGen(o =>
        {
            o.SwaggerDoc(DocumentName, new OpenApiInfo
            {
                Title = "Lookahead",
                Version = "v1",
                Description = "Optimal control moves for linear plants: register a plant-and-cost model once, then post measured states for the optimal input sequence and predicted trajectory.",
            });
            o.MapType<WeightDto>(() => new OpenApiSchema
            {
                Description = "A weight: a vector (its diagonal) or a square matrix (array of rows).",
                OneOf = [Vector(), Matrix()],
            });
            o.MapType<TerminalWeightDto>(() => new OpenApiSchema
            {
                Description = "Terminal weight: 'riccati' (default), 'stage', or an explicit n×n matrix.",
                OneOf =
                [
                    new OpenApiSchema { Type = JsonSchemaType.String, Enum = [JsonValue.Create("riccati"), JsonValue.Create("stage")] },
                    Matrix(),
                ],
            });
            o.MapType<TrajectoryRows>(() => new OpenApiSchema
            {
                Description = "Rows of a trajectory (one row per step); numbers carry 15 significant digits.",
                Type = JsonSchemaType.Array,
                Items = Vector(),
            });
            o.SupportNonNullableReferenceTypes();
            o.OperationFilter<SvgResponseFilter>();
        });
        return services;
    }

    private static OpenApiSchema Vector() => new() { Type = JsonSchemaType.Array, Items = new OpenApiSchema { Type = JsonSchemaType.Number, Format = "double" } };

    private static OpenApiSchema Matrix() => new() { Type = JsonSchemaType.Array, Items = Vector() };
}
