using Microsoft.AspNetCore.RateLimiting;
using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace Lookahead.Api.Hosting;

/// <summary>
/// The answers every /v1 operation can give whatever its feature: 429 (the per-client window or solver slots), 503
/// (store unreachable, compile budget spent) and 500 (a fault, logged with the trace id), each a problem document;
/// 429 and 503 say when to come back in Retry-After.
/// </summary>
public sealed class StandardResponsesOperationFilter : IOperationFilter
{
    public void Apply(OpenApiOperation operation, OperationFilterContext context)
    {
        var metadata = context.ApiDescription.ActionDescriptor.EndpointMetadata;
        operation.Responses ??= [];
        if (metadata.OfType<EnableRateLimitingAttribute>().Any())
        {
            Add(operation, context, "429", "Too many requests from this client (its request window, or its solver slots while plans run); retry after Retry-After seconds.", retryAfter: true);
        }

        Add(operation, context, "503", "The store is unreachable or not writable, or the compile budget is spent; retry after Retry-After seconds.", retryAfter: true);
        Add(operation, context, "500", "An unexpected fault; the answer says nothing about internals and the incident is logged with its trace id.", retryAfter: false);
    }

    private static void Add(OpenApiOperation operation, OperationFilterContext context, string status, string description, bool retryAfter)
    {
        if (operation.Responses!.ContainsKey(status))
        {
            return;
        }

        var response = new OpenApiResponse
        {
            Description = description,
            Content = new Dictionary<string, IOpenApiMediaType>
            {
                ["application/problem+json"] = new OpenApiMediaType { Schema = new OpenApiSchemaReference(ProblemSchemaDocumentFilter.SchemaName, context.Document) },
            },
        };
        if (retryAfter)
        {
            response.Headers = new Dictionary<string, IOpenApiHeader>
            {
                ["Retry-After"] = new OpenApiHeader { Description = "Seconds to wait before retrying.", Schema = new OpenApiSchema { Type = JsonSchemaType.Integer, Format = "int32" } },
            };
        }

        operation.Responses[status] = response;
    }
}
