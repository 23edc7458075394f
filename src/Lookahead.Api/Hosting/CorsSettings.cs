using System.ComponentModel.DataAnnotations;

namespace Lookahead.Api.Hosting;

/// <summary>
/// Cross-origin access ("Cors" section) for browser pages served from elsewhere, such as a tuning page on another
/// host. Off unless origins are listed: a browser then refuses every cross-origin call, which is the safe default for
/// a service that moves plant inputs. Keys travel in headers, never cookies, so credentials are not allowed.
/// </summary>
public sealed class CorsSettings
{
    public const string Section = "Cors";

    /// <summary>Origins allowed to call the service (scheme, host and port, e.g. https://tuning.example.net), or "*" for any.</summary>
    public List<string> AllowedOrigins { get; set; } = [];

    /// <summary>How long a browser may keep a preflight answer.</summary>
    [Range(0, 86400)]
    public int MaxAgeSeconds { get; set; } = 600;

    public bool Enabled => AllowedOrigins.Count > 0;

    /// <summary>True when every entry is "*" or an origin without a path.</summary>
    public bool OriginsWellFormed() =>
        AllowedOrigins.All(o => o == "*" || (Uri.TryCreate(o, UriKind.Absolute, out var uri) && uri.Scheme is "http" or "https" && uri.AbsolutePath == "/" && !o.EndsWith('/')));
}
