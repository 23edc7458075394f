using Lookahead.Api.Charts;
using Microsoft.OpenApi;

namespace Lookahead.Api.Hosting;

/// <summary>Swashbuckle setup. Rooms whose types have custom JSON converters map their wire schemas themselves.</summary>
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
            o.SupportNonNullableReferenceTypes();
            o.OperationFilter<SvgResponseFilter>();
        });
        return services;
    }
}
