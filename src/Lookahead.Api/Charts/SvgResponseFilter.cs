using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace Lookahead.Api.Charts;

/// <summary>Marks an endpoint whose 200 can also be an SVG chart (?format=svg).</summary>
public sealed class SvgAlternativeMetadata;

/// <summary>Adds image/svg+xml beside the JSON schema of the 200 answer, instead of replacing it.</summary>
public sealed class SvgResponseFilter : IOperationFilter
{
    public void Apply(OpenApiOperation operation, OperationFilterContext context)
    {
        bool svg = context.ApiDescription.ActionDescriptor.EndpointMetadata.OfType<SvgAlternativeMetadata>().Any();
        if (svg && operation.Responses?.TryGetValue("200", out var ok) == true && ok is OpenApiResponse response)
        {
            response.Content ??= new Dictionary<string, IOpenApiMediaType>();
            response.Content[ResponseFormats.SvgContentType] = new OpenApiMediaType
            {
                Schema = new OpenApiSchema { Type = JsonSchemaType.String, Description = "An SVG chart of the trajectories (with ?format=svg)." },
            };
        }
    }
}
