using System.Net;
using System.Text;

namespace Lookahead.Client.Tests.Support;

/// <summary>
/// Sits in front of the service's handler: answers the first requests from a script (a refusal the service would
/// give under load), then passes requests through. Counts every request and records the Authorization header.
/// </summary>
public sealed class ScriptedHandler(HttpMessageHandler service, params Func<HttpResponseMessage>[] script) : DelegatingHandler(service)
{
    private int sent;

    public int Requests => sent;

    public List<string?> Authorizations { get; } = [];

    public List<string> Bodies { get; } = [];

    protected override async Task<HttpResponseMessage> SendAsync(HttpRequestMessage request, CancellationToken cancellationToken)
    {
        int n = Interlocked.Increment(ref sent);
        Authorizations.Add(request.Headers.Authorization?.ToString());
        Bodies.Add(request.Content is null ? "" : await request.Content.ReadAsStringAsync(cancellationToken));
        if (n <= script.Length)
        {
            return script[n - 1]();
        }

        return await base.SendAsync(request, cancellationToken);
    }

    /// <summary>A 503 problem like the service's own, with the given Retry-After header value (none when null).</summary>
    public static HttpResponseMessage Unavailable(string? retryAfter) => Refusal(HttpStatusCode.ServiceUnavailable, "urn:lookahead:problem:unavailable", retryAfter);

    public static HttpResponseMessage TooMany(string? retryAfter) => Refusal(HttpStatusCode.TooManyRequests, "urn:lookahead:problem:rate-limited", retryAfter);

    private static HttpResponseMessage Refusal(HttpStatusCode status, string type, string? retryAfter)
    {
        string body = $$"""{"type":"{{type}}","title":"Try again later","status":{{(int)status}},"detail":"busy","traceId":"00-scripted","errors":[]}""";
        var response = new HttpResponseMessage(status) { Content = new StringContent(body, Encoding.UTF8, "application/problem+json") };
        if (retryAfter is not null)
        {
            response.Headers.TryAddWithoutValidation("Retry-After", retryAfter);
        }

        return response;
    }
}
