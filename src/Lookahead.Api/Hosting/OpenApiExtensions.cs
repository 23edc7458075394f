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

            // Keys go as "Authorization: Bearer <key>" (or X-Api-Key); without configured keys the service is open on loopback.
            o.AddSecurityDefinition(Access.ApiKeyAuthentication.SchemeName, new OpenApiSecurityScheme
            {
                Type = SecuritySchemeType.Http,
                Scheme = "bearer",
                Description = "An API key, configured on the service by its SHA-256; scopes models:write, plans:run, stations:step, admin.",
            });
            o.AddSecurityRequirement(document => new OpenApiSecurityRequirement
            {
                [new OpenApiSecuritySchemeReference(Access.ApiKeyAuthentication.SchemeName, document)] = [],
            });
            o.OperationFilter<SvgResponseFilter>();
            o.OperationFilter<CsvResponseFilter>();
        });
        return services;
    }
}
