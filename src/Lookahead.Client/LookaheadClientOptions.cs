namespace Lookahead.Client;

/// <summary>How a <see cref="LookaheadClient"/> reaches the service and how patient it is.</summary>
public sealed class LookaheadClientOptions
{
    /// <summary>The service's address; when null, the HttpClient's own BaseAddress is used.</summary>
    public Uri? BaseAddress { get; set; }

    /// <summary>Sent as <c>Authorization: Bearer …</c> on every request when set.</summary>
    public string? ApiKey { get; set; }

    /// <summary>Attempts per request in all, the first included (1: never retry). Default 4.</summary>
    public int MaxAttempts { get; set; } = 4;

    /// <summary>Waiting longer than this for one retry is not worth it: the refusal is thrown instead. Default 30 s.</summary>
    public TimeSpan MaxRetryDelay { get; set; } = TimeSpan.FromSeconds(30);

    /// <summary>The wait before a retry when a 429 or 503 carries no Retry-After. Default 1 s.</summary>
    public TimeSpan DefaultRetryDelay { get; set; } = TimeSpan.FromSeconds(1);

    /// <summary>How the client waits before a retry; the default is <see cref="Task.Delay(TimeSpan, CancellationToken)"/>.</summary>
    public Func<TimeSpan, CancellationToken, Task> WaitAsync { get; set; } = Task.Delay;

    /// <summary>Used to read an HTTP-date Retry-After.</summary>
    public TimeProvider TimeProvider { get; set; } = TimeProvider.System;
}
