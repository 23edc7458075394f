using Microsoft.AspNetCore.StaticFiles;

namespace Lookahead.Api.Hosting;

/// <summary>
/// The tuning page at <c>/</c>: plain HTML, CSS and JavaScript modules from wwwroot, served as they are (no build step,
/// nothing fetched from elsewhere at run time).
/// </summary>
/// <remarks>
/// It sits before authentication on purpose: the files hold no data, and the page itself asks for the API key that
/// every /v1 call it makes then carries. The content security policy keeps the page to this origin's own files.
/// </remarks>
public static class TuningPage
{
    public const string ContentSecurityPolicy =
        "default-src 'self'; img-src 'self' data: blob:; style-src 'self'; script-src 'self'; connect-src 'self'; object-src 'none'; base-uri 'none'; frame-ancestors 'none'";

    public static WebApplication UseTuningPage(this WebApplication app)
    {
        app.UseDefaultFiles();
        var types = new FileExtensionContentTypeProvider();
        types.Mappings[".js"] = "text/javascript; charset=utf-8";
        app.UseStaticFiles(new StaticFileOptions
        {
            ContentTypeProvider = types,
            OnPrepareResponse = context =>
            {
                var headers = context.Context.Response.Headers;
                headers.ContentSecurityPolicy = ContentSecurityPolicy;
                headers.XContentTypeOptions = "nosniff";
                // The page changes with the service; a stale script against a newer API helps nobody.
                headers.CacheControl = "no-cache";
            },
        });
        return app;
    }
}
