using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace Lookahead.Api.Http;

/// <summary>Marks the named members of one type's schema as required (see <see cref="OpenApiContract.RequireMembers{T}"/>).</summary>
public sealed class RequiredMembersSchemaFilter(Type type, IReadOnlyList<string> wireNames) : ISchemaFilter
{
    public void Apply(IOpenApiSchema schema, SchemaFilterContext context)
    {
        if (context.Type != type || schema is not OpenApiSchema concrete)
        {
            return;
        }

        foreach (string name in wireNames)
        {
            if (concrete.Properties?.ContainsKey(name) != true)
            {
                // A renamed member must not leave the contract quietly wrong.
                throw new InvalidOperationException($"{type.Name} has no member '{name}' to require");
            }

            concrete.Required ??= new HashSet<string>(StringComparer.Ordinal);
            concrete.Required.Add(name);

            // Null is no more a value for a required member than absence is.
            if (concrete.Properties[name] is OpenApiSchema { Type: { } memberType } member)
            {
                member.Type = memberType & ~JsonSchemaType.Null;
            }
        }
    }
}
