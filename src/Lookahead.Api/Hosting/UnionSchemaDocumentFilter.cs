using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace Lookahead.Api.Hosting;

/// <summary>
/// A nullable member whose schema is a union (a weight, a reference schedule) comes out of the generator with a bare
/// "null" alternative that has no type, which OpenAPI 3.0 does not allow. Requests may leave such members out (the
/// service never writes a null), so the alternative is dropped and the union keeps only its typed shapes.
/// </summary>
public sealed class UnionSchemaDocumentFilter : IDocumentFilter
{
    public void Apply(OpenApiDocument swaggerDoc, DocumentFilterContext context)
    {
        var visited = new HashSet<OpenApiSchema>(ReferenceEqualityComparer.Instance);
        foreach (var schema in swaggerDoc.Components?.Schemas?.Values ?? [])
        {
            Visit(schema, visited);
        }
    }

    private static void Visit(IOpenApiSchema? candidate, HashSet<OpenApiSchema> visited)
    {
        if (candidate is not OpenApiSchema schema || !visited.Add(schema))
        {
            return;
        }

        if (schema.OneOf is { Count: > 1 } alternatives)
        {
            for (int i = alternatives.Count - 1; i >= 0; i--)
            {
                if (alternatives[i] is OpenApiSchema { Properties: null or { Count: 0 }, Items: null } alternative && IsBareNull(alternative))
                {
                    alternatives.RemoveAt(i);
                }
            }
        }

        foreach (var child in (schema.Properties?.Values ?? []).Concat(schema.OneOf ?? []).Concat(schema.AnyOf ?? []).Concat(schema.AllOf ?? []))
        {
            Visit(child, visited);
        }

        Visit(schema.Items, visited);
    }

    private static bool IsBareNull(OpenApiSchema schema) =>
        schema.Type == JsonSchemaType.Null || (schema.Type is null && schema.Enum is { Count: 1 } only && only[0] is null);
}
