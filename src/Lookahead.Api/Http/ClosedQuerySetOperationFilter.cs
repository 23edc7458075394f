using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace Lookahead.Api.Http;

/// <summary>Gives a query parameter of the operations <paramref name="applies"/> selects its closed set of values.</summary>
public sealed class ClosedQuerySetOperationFilter(Func<IReadOnlyList<object>, bool> applies, string name, IReadOnlyList<string> values) : IOperationFilter
{
    public void Apply(OpenApiOperation operation, OperationFilterContext context)
    {
        if (!applies([.. context.ApiDescription.ActionDescriptor.EndpointMetadata]))
        {
            return;
        }

        var parameter = operation.Parameters?.OfType<OpenApiParameter>().FirstOrDefault(p => p.In == ParameterLocation.Query && p.Name == name);
        if (parameter?.Schema is OpenApiSchema schema)
        {
            ClosedSetSchemaFilter.Restrict(schema, values);
        }
    }
}
