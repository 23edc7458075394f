using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace Lookahead.Api.Charts;

/// <summary>
/// Adds another media type beside the JSON schema of the 200 answer (instead of replacing it) on endpoints carrying
/// the marker <typeparamref name="TMarker"/>: the same answer in another form, chosen by ?format=.
/// </summary>
public abstract class AlternativeResponseFilter<TMarker> : IOperationFilter
{
    protected abstract string ContentType { get; }

    protected abstract string Description { get; }

    public void Apply(OpenApiOperation operation, OperationFilterContext context)
    {
        bool marked = context.ApiDescription.ActionDescriptor.EndpointMetadata.OfType<TMarker>().Any();
        if (marked && operation.Responses?.TryGetValue("200", out var ok) == true && ok is OpenApiResponse response)
        {
            response.Content ??= new Dictionary<string, IOpenApiMediaType>();
            response.Content[ContentType] = new OpenApiMediaType
            {
                Schema = new OpenApiSchema { Type = JsonSchemaType.String, Description = Description },
            };
        }
    }
}
