using System.Text.Json.Nodes;
using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace Lookahead.Api.Http;

/// <summary>Gives one string member of one type's schema its closed set of values (see <see cref="OpenApiContract.CloseSet{T}"/>).</summary>
public sealed class ClosedSetSchemaFilter(Type type, string wireName, IReadOnlyList<string> values) : ISchemaFilter
{
    public void Apply(IOpenApiSchema schema, SchemaFilterContext context)
    {
        if (context.Type != type || schema is not OpenApiSchema concrete)
        {
            return;
        }

        if (concrete.Properties?.TryGetValue(wireName, out var member) != true || member is not OpenApiSchema property)
        {
            throw new InvalidOperationException($"{type.Name} has no member '{wireName}' to close");
        }

        Restrict(property, values);
    }

    /// <summary>Puts the values on a string schema (a nullable member keeps null out of the list: absent is the way to omit it).</summary>
    public static void Restrict(OpenApiSchema property, IEnumerable<string> values)
    {
        property.Type = JsonSchemaType.String;
        property.Enum = [.. values.Select(v => (JsonNode)JsonValue.Create(v))];
    }
}
