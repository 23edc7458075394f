using Lookahead.Api.Charts;
using Lookahead.Api.Http;
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
                Description = "Optimal control moves for linear plants: register a plant-and-cost model once, then post measured states for the optimal input sequence and predicted trajectory. Every refusal is an RFC 9457 problem document (application/problem+json) naming each field at fault.",
                License = new OpenApiLicense { Name = "MIT", Url = new Uri("https://opensource.org/license/mit") },
            });
            o.AddServer(new OpenApiServer { Url = "http://127.0.0.1:5000", Description = "The default listen address (loopback; see Urls in the configuration)" });
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
            o.CloseQuerySet<SvgAlternativeMetadata>("format", ["json", "svg", "csv"]);
            o.SchemaFilter<AlwaysWrittenMembersSchemaFilter>();
            o.OperationFilter<StandardResponsesOperationFilter>();
            o.OperationFilter<ExamplesOperationFilter>();
            o.DocumentFilter<ProblemSchemaDocumentFilter>();
            o.DocumentFilter<UnionSchemaDocumentFilter>();
            o.DocumentFilter<TagDescriptionsDocumentFilter>();
            o.CloseSet<WarningDto>("code", WarningCodes.All);
            o.CloseSet<WarningDto>("limit", WarningCodes.LimitKinds);
        });
        return services;
    }
}
