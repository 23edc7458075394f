using Swashbuckle.AspNetCore.SwaggerGen;

namespace Lookahead.Api.Http;

/// <summary>
/// How a room states its part of the wire contract that the CLR types cannot say: which request members are required
/// (the records keep every member optional so that a missing one is reported by path, not by the parser) and which
/// string members take one of a closed set of values. Each room declares its own types beside their mapping.
/// </summary>
public static class OpenApiContract
{
    /// <summary>Members of <typeparamref name="T"/> (wire names) a request is refused without.</summary>
    public static SwaggerGenOptions RequireMembers<T>(this SwaggerGenOptions options, params string[] wireNames)
    {
        options.AddSchemaFilterInstance(new RequiredMembersSchemaFilter(typeof(T), wireNames));
        return options;
    }

    /// <summary>The string member <paramref name="wireName"/> of <typeparamref name="T"/> takes only <paramref name="values"/>.</summary>
    public static SwaggerGenOptions CloseSet<T>(this SwaggerGenOptions options, string wireName, IEnumerable<string> values)
    {
        options.AddSchemaFilterInstance(new ClosedSetSchemaFilter(typeof(T), wireName, [.. values]));
        return options;
    }

    /// <summary>The query parameter <paramref name="name"/> of the operations carrying <typeparamref name="TMarker"/> takes only <paramref name="values"/>.</summary>
    public static SwaggerGenOptions CloseQuerySet<TMarker>(this SwaggerGenOptions options, string name, IEnumerable<string> values)
    {
        options.AddOperationFilterInstance(new ClosedQuerySetOperationFilter(metadata => metadata.OfType<TMarker>().Any(), name, [.. values]));
        return options;
    }

    /// <summary>The query parameter <paramref name="name"/> of the endpoint named <paramref name="endpointName"/> takes only <paramref name="values"/>.</summary>
    public static SwaggerGenOptions CloseQuerySet(this SwaggerGenOptions options, string endpointName, string name, IEnumerable<string> values)
    {
        options.AddOperationFilterInstance(new ClosedQuerySetOperationFilter(
            metadata => metadata.OfType<IEndpointNameMetadata>().Any(n => n.EndpointName == endpointName), name, [.. values]));
        return options;
    }
}
