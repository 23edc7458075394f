using System.Net;
using System.Net.Http.Headers;
using System.Text;
using System.Text.Json;

namespace Lookahead.Client;

/// <summary>
/// Typed access to a Lookahead service. Every call takes a cancellation token; a refusal is thrown as
/// <see cref="LookaheadProblemException"/>; 429 and 503 answers are retried after their Retry-After, at most
/// <see cref="LookaheadClientOptions.MaxAttempts"/> times in all (a replay, whose upload is a stream, never is).
/// One instance is safe to share between threads.
/// </summary>
public sealed partial class LookaheadClient : IDisposable
{
    private const string JsonMediaType = "application/json";
    private readonly HttpClient http;
    private readonly bool ownsHttp;
    private readonly LookaheadClientOptions options;
    private readonly Uri baseAddress;

    /// <summary>Uses the given HttpClient (not disposed with this client); its BaseAddress applies unless the options give one.</summary>
    public LookaheadClient(HttpClient http, LookaheadClientOptions? options = null)
        : this(http, options, disposeHttpClient: false)
    {
    }

    /// <summary>Uses the given HttpClient and disposes it with this client when <paramref name="disposeHttpClient"/> is true.</summary>
    public LookaheadClient(HttpClient http, LookaheadClientOptions? options, bool disposeHttpClient)
    {
        ArgumentNullException.ThrowIfNull(http);
        options ??= new LookaheadClientOptions();
        if (options.MaxAttempts < 1)
        {
            throw new ArgumentOutOfRangeException(nameof(options), "MaxAttempts must be at least 1");
        }

        this.http = http;
        this.options = options;
        ownsHttp = disposeHttpClient;
        var address = options.BaseAddress ?? http.BaseAddress
            ?? throw new ArgumentException("Give the service's address in the options or as the HttpClient's BaseAddress", nameof(options));

        // A base address without a trailing slash would drop its last segment when relative paths are added.
        baseAddress = address.AbsoluteUri.EndsWith('/') ? address : new Uri(address.AbsoluteUri + "/");
    }

    /// <summary>Talks to the service at <paramref name="baseAddress"/> with an HttpClient of its own.</summary>
    public LookaheadClient(Uri baseAddress, string? apiKey = null)
        : this(new HttpClient { Timeout = Timeout.InfiniteTimeSpan }, new LookaheadClientOptions { BaseAddress = baseAddress, ApiKey = apiKey }, disposeHttpClient: true)
    {
    }

    public void Dispose()
    {
        if (ownsHttp)
        {
            http.Dispose();
        }
    }

    private static string Segment(string value)
    {
        ArgumentException.ThrowIfNullOrEmpty(value);
        return Uri.EscapeDataString(value);
    }

    private Uri Address(string relative) => new(baseAddress, relative);

    private async Task<T> SendJsonAsync<T>(HttpMethod method, string relative, object? body, CancellationToken cancellationToken)
    {
        byte[]? payload = body is null ? null : ClientJson.ToUtf8(body, body.GetType());
        using var response = await SendAsync(method, relative, payload, JsonMediaType, cancellationToken);
        return await ReadJsonAsync<T>(response, cancellationToken);
    }

    private async Task<T> SendRawJsonAsync<T>(HttpMethod method, string relative, string json, CancellationToken cancellationToken)
    {
        using var response = await SendAsync(method, relative, Encoding.UTF8.GetBytes(json), JsonMediaType, cancellationToken);
        return await ReadJsonAsync<T>(response, cancellationToken);
    }

    private async Task<string> SendForTextAsync(HttpMethod method, string relative, object body, CancellationToken cancellationToken)
    {
        using var response = await SendAsync(method, relative, ClientJson.ToUtf8(body, body.GetType()), JsonMediaType, cancellationToken);
        return await response.Content.ReadAsStringAsync(cancellationToken);
    }

    private async Task SendWithoutAnswerAsync(HttpMethod method, string relative, CancellationToken cancellationToken)
    {
        using var response = await SendAsync(method, relative, null, null, cancellationToken);
    }

    private static async Task<T> ReadJsonAsync<T>(HttpResponseMessage response, CancellationToken cancellationToken)
    {
        await using var stream = await response.Content.ReadAsStreamAsync(cancellationToken);
        return await JsonSerializer.DeserializeAsync<T>(stream, ClientJson.Options, cancellationToken)
            ?? throw new InvalidDataException("the service answered an empty document");
    }

    /// <summary>
    /// Sends a request whose body is held in memory (so it can be sent again), retrying 429 and 503 after their
    /// Retry-After while attempts remain and the wait is within <see cref="LookaheadClientOptions.MaxRetryDelay"/>.
    /// Returns a successful answer; any other is thrown as a problem.
    /// </summary>
    private async Task<HttpResponseMessage> SendAsync(HttpMethod method, string relative, byte[]? payload, string? mediaType, CancellationToken cancellationToken)
    {
        for (int attempt = 1; ; attempt++)
        {
            cancellationToken.ThrowIfCancellationRequested();
            using var request = new HttpRequestMessage(method, Address(relative));
            if (payload is not null)
            {
                var content = new ByteArrayContent(payload);
                content.Headers.ContentType = new MediaTypeHeaderValue(mediaType!);
                request.Content = content;
            }

            var response = await SendOnceAsync(request, HttpCompletionOption.ResponseContentRead, cancellationToken);
            if (response.IsSuccessStatusCode)
            {
                return response;
            }

            using (response)
            {
                var wait = RetryAfter.Read(response, options.TimeProvider);
                bool retryable = response.StatusCode is HttpStatusCode.TooManyRequests or HttpStatusCode.ServiceUnavailable;
                var delay = wait ?? options.DefaultRetryDelay;
                if (!retryable || attempt >= options.MaxAttempts || delay > options.MaxRetryDelay)
                {
                    throw await ReadProblemAsync(response, options.TimeProvider, cancellationToken);
                }

                await options.WaitAsync(delay, cancellationToken);
            }
        }
    }

    private Task<HttpResponseMessage> SendOnceAsync(HttpRequestMessage request, HttpCompletionOption completion, CancellationToken cancellationToken)
    {
        if (!string.IsNullOrEmpty(options.ApiKey))
        {
            request.Headers.Authorization = new AuthenticationHeaderValue("Bearer", options.ApiKey);
        }

        return http.SendAsync(request, completion, cancellationToken);
    }

    /// <summary>Turns a refusal into an exception: the problem document's members when there is one, else the status alone.</summary>
    internal static async Task<LookaheadProblemException> ReadProblemAsync(HttpResponseMessage response, TimeProvider clock, CancellationToken cancellationToken)
    {
        var retryAfter = RetryAfter.Read(response, clock);
        string text = await response.Content.ReadAsStringAsync(cancellationToken);
        string? traceHeader = response.Headers.TryGetValues("trace-id", out var values) ? values.FirstOrDefault() : null;
        var extensions = new Dictionary<string, JsonElement>(StringComparer.Ordinal);
        var errors = new List<ProblemFieldError>();
        string? type = null, title = null, detail = null, instance = null, traceId = traceHeader;
        try
        {
            using var document = JsonDocument.Parse(text);
            if (document.RootElement.ValueKind == JsonValueKind.Object)
            {
                foreach (var member in document.RootElement.EnumerateObject())
                {
                    switch (member.Name)
                    {
                        case "type": type = member.Value.ToString(); break;
                        case "title": title = member.Value.ToString(); break;
                        case "detail": detail = member.Value.ToString(); break;
                        case "instance": instance = member.Value.ToString(); break;
                        case "traceId": traceId = member.Value.ToString(); break;
                        case "status": break;
                        case "errors" when member.Value.ValueKind == JsonValueKind.Array:
                            foreach (var error in member.Value.EnumerateArray())
                            {
                                errors.Add(new ProblemFieldError(
                                    error.TryGetProperty("path", out var path) ? path.ToString() : "",
                                    error.TryGetProperty("reason", out var reason) ? reason.ToString() : ""));
                            }

                            break;
                        default: extensions[member.Name] = member.Value.Clone(); break;
                    }
                }
            }
        }
        catch (JsonException)
        {
            // Not a problem document (a proxy's page, an empty body): the status alone says what happened.
            detail = text.Length > 200 ? text[..200] : (text.Length == 0 ? null : text);
        }

        return new LookaheadProblemException(response.StatusCode, type, title ?? response.ReasonPhrase, detail, instance, traceId, errors, extensions, retryAfter);
    }
}
