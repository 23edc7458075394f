using System.Text.Encodings.Web;
using System.Text.Json;
using System.Text.Json.Serialization;

namespace Lookahead.Api.Http;

/// <summary>The one place that decides how the service reads and writes JSON.</summary>
public static class ApiJson
{
    /// <summary>
    /// Strict reading: unknown or duplicated fields are errors (a typo must not silently change a model),
    /// numbers must be numbers, depth and array lengths are bounded. Output is camelCase without nulls.
    /// </summary>
    public static void Configure(JsonSerializerOptions options, RequestLimitsOptions limits)
    {
        options.PropertyNamingPolicy = JsonNamingPolicy.CamelCase;
        options.PropertyNameCaseInsensitive = false;
        options.DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull;
        options.UnmappedMemberHandling = JsonUnmappedMemberHandling.Disallow;
        options.AllowDuplicateProperties = false;
        options.NumberHandling = JsonNumberHandling.Strict;
        options.ReadCommentHandling = JsonCommentHandling.Disallow;
        options.AllowTrailingCommas = false;
        options.MaxDepth = limits.MaxJsonDepth;
        options.Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping;
        options.Converters.Insert(0, new BoundedVectorConverter(limits.MaxArrayLength));
        options.Converters.Insert(1, new BoundedNullableVectorConverter(limits.MaxArrayLength));
        options.Converters.Insert(2, new BoundedMatrixConverter(limits.MaxArrayLength));
    }

    /// <summary>
    /// Puts a room's source-generated metadata first in the resolver chain, so its hot paths do no reflection.
    /// Each room registers its own context for the records it owns.
    /// </summary>
    public static IServiceCollection AddJsonContext(this IServiceCollection services, JsonSerializerContext context)
    {
        services.Configure<Microsoft.AspNetCore.Http.Json.JsonOptions>(json => json.SerializerOptions.TypeInfoResolverChain.Insert(0, context));
        return services;
    }

    /// <summary>Options configured as above, for code that runs outside a request (demo seeding, tests).</summary>
    public static JsonSerializerOptions Create(RequestLimitsOptions limits)
    {
        var options = new JsonSerializerOptions(JsonSerializerDefaults.Web);
        Configure(options, limits);
        options.TypeInfoResolverChain.Add(new System.Text.Json.Serialization.Metadata.DefaultJsonTypeInfoResolver());
        options.MakeReadOnly();
        return options;
    }

    internal static int MaxArrayLength(JsonSerializerOptions options)
    {
        foreach (var converter in options.Converters)
        {
            if (converter is BoundedVectorConverter bounded)
            {
                return bounded.MaxLength;
            }
        }

        return new RequestLimitsOptions().MaxArrayLength;
    }
}
