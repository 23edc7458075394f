namespace Lookahead.Api.Http;

/// <summary>Stable problem type URIs (RFC 9457 "type"); clients switch on these, not on titles.</summary>
public static class ProblemTypes
{
    private const string Prefix = "urn:lookahead:problem:";

    public const string Validation = Prefix + "validation";
    public const string MalformedJson = Prefix + "malformed-json";
    public const string MalformedId = Prefix + "malformed-id";
    public const string NotFound = Prefix + "not-found";
    public const string Conflict = Prefix + "conflict";
    public const string PayloadTooLarge = Prefix + "payload-too-large";
    public const string UnsupportedMediaType = Prefix + "unsupported-media-type";
    public const string TooManyRequests = Prefix + "too-many-requests";
    public const string Unavailable = Prefix + "unavailable";
    public const string Unauthenticated = Prefix + "unauthenticated";
    public const string Forbidden = Prefix + "forbidden";
    public const string Internal = Prefix + "internal";
    public const string Http = Prefix + "http";
}
