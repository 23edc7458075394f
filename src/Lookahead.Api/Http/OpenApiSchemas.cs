using Microsoft.OpenApi;

namespace Lookahead.Api.Http;

/// <summary>Schema pieces for types whose JSON comes from a custom converter (rooms map their own types with these).</summary>
public static class OpenApiSchemas
{
    public static OpenApiSchema Vector() => new() { Type = JsonSchemaType.Array, Items = new OpenApiSchema { Type = JsonSchemaType.Number, Format = "double" } };

    public static OpenApiSchema Matrix() => new() { Type = JsonSchemaType.Array, Items = Vector() };
}
