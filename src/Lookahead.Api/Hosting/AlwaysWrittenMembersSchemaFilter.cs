using System.Reflection;
using System.Text.Json;
using System.Text.Json.Serialization;
using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace Lookahead.Api.Hosting;

/// <summary>
/// Marks as required every member the service always writes: the service leaves out nulls only, so a member whose type
/// cannot be null (and that has no default a client may leave to the service) is always there. Generated clients
/// then type it as non-optional instead of making every field of every answer nullable.
/// </summary>
public sealed class AlwaysWrittenMembersSchemaFilter : ISchemaFilter
{
    private readonly NullabilityInfoContext nullability = new();

    public void Apply(IOpenApiSchema schema, SchemaFilterContext context)
    {
        if (schema is not OpenApiSchema { Properties.Count: > 0 } concrete || context.Type.Namespace?.StartsWith("Lookahead.", StringComparison.Ordinal) != true)
        {
            return;
        }

        var defaults = context.Type.GetConstructors()
            .SelectMany(c => c.GetParameters())
            .Where(p => p.HasDefaultValue && p.Name is not null)
            .Select(p => p.Name!)
            .ToHashSet(StringComparer.OrdinalIgnoreCase);

        foreach (var property in context.Type.GetProperties(BindingFlags.Public | BindingFlags.Instance))
        {
            if (property.GetCustomAttribute<JsonIgnoreAttribute>() is not null || defaults.Contains(property.Name))
            {
                continue;
            }

            string wireName = property.GetCustomAttribute<JsonPropertyNameAttribute>()?.Name ?? JsonNamingPolicy.CamelCase.ConvertName(property.Name);
            if (!concrete.Properties.ContainsKey(wireName) || CanBeNull(property))
            {
                continue;
            }

            concrete.Required ??= new HashSet<string>(StringComparer.Ordinal);
            concrete.Required.Add(wireName);
        }
    }

    private bool CanBeNull(PropertyInfo property)
    {
        if (property.PropertyType.IsValueType)
        {
            return Nullable.GetUnderlyingType(property.PropertyType) is not null;
        }

        return nullability.Create(property).ReadState != NullabilityState.NotNull;
    }
}
