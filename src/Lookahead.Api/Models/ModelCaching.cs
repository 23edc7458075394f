using System.Globalization;
using Microsoft.Net.Http.Headers;

namespace Lookahead.Api.Models;

/// <summary>
/// HTTP caching of a model's GET. A model's id is the hash of its content, so what an id names never changes; only
/// its registration time does, when the model is deleted and registered again. The entity tag names both, and the
/// answer may be kept for a year without asking again (immutable). It is private: the answer belongs to the caller's
/// tenant and key, so no shared cache may hand it to anyone else.
/// </summary>
public static class ModelCaching
{
    public const string CacheControl = "private, max-age=31536000, immutable";

    public static EntityTagHeaderValue Tag(string id, DateTimeOffset registeredAt) =>
        new($"\"{id}.{registeredAt.ToUnixTimeMilliseconds().ToString(CultureInfo.InvariantCulture)}\"");

    /// <summary>True when the request's If-None-Match already names this version (weak comparison, as RFC 9110 asks for it).</summary>
    public static bool IsFresh(HttpRequest request, EntityTagHeaderValue tag)
    {
        var given = request.GetTypedHeaders().IfNoneMatch;
        return given.Any(t => t.Equals(EntityTagHeaderValue.Any) || t.Compare(tag, useStrongComparison: false));
    }

    public static void Describe(HttpResponse response, EntityTagHeaderValue tag)
    {
        response.Headers.ETag = tag.ToString();
        response.Headers.CacheControl = CacheControl;

        // Another key may belong to another tenant, which must not be answered from this one's copy.
        response.Headers.Vary = "Authorization, X-Api-Key";
    }
}
