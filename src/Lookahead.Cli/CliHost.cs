using Lookahead.Client;
using Spectre.Console;

namespace Lookahead.Cli;

/// <summary>
/// What the commands run against: the console they write to and, for tests and embedding, the HTTP handler that
/// reaches the service (null: a real network connection).
/// </summary>
public sealed class CliHost
{
    public CliHost(IAnsiConsole console, HttpMessageHandler? handler = null)
    {
        Console = console;
        Handler = handler;
    }

    public IAnsiConsole Console { get; }

    public HttpMessageHandler? Handler { get; }

    /// <summary>Set by tests to record retry waits instead of sleeping.</summary>
    public Func<TimeSpan, CancellationToken, Task>? RetryWait { get; init; }

    public static CliHost ForConsole() => new(AnsiConsole.Console);

    internal LookaheadClient CreateClient(ServiceSettings settings)
    {
        var http = Handler is null ? new HttpClient() : new HttpClient(Handler, disposeHandler: false);

        // Replays stream for as long as they take; Ctrl+C is the bound.
        http.Timeout = Timeout.InfiniteTimeSpan;
        var options = new LookaheadClientOptions
        {
            BaseAddress = new Uri(settings.Service),
            ApiKey = string.IsNullOrEmpty(settings.ApiKey) ? Environment.GetEnvironmentVariable("LOOKAHEAD_API_KEY") : settings.ApiKey,
            MaxAttempts = settings.Attempts,
        };
        if (RetryWait is not null)
        {
            options.WaitAsync = RetryWait;
        }

        return new LookaheadClient(http, options, disposeHttpClient: true);
    }
}
