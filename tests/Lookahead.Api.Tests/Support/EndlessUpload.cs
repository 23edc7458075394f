using System.Globalization;
using System.Net.Sockets;
using System.Text;

namespace Lookahead.Api.Tests.Support;

/// <summary>
/// A replay upload over a raw socket that never ends by itself: chunked rows keep coming until the answer has ended
/// or the connection breaks, as from a historian still exporting. The answer is read as it arrives, so a test can
/// act while the replay runs and then see exactly how the answer ended (chunked terminator, or the socket closed).
/// </summary>
public sealed class EndlessUpload : IAsyncDisposable
{
    private readonly TcpClient connection;
    private readonly NetworkStream stream;
    private readonly CancellationTokenSource stop = new();
    private readonly MemoryStream received = new();
    private readonly Task writing;
    private readonly Task reading;
    private TaskCompletionSource progress = new(TaskCreationOptions.RunContinuationsAsynchronously);
    private bool closed;

    private EndlessUpload(TcpClient connection, string request, string head, Func<long, string> row)
    {
        this.connection = connection;
        stream = connection.GetStream();
        writing = Task.Run(() => WriteAsync(request, head, row));
        reading = Task.Run(ReadAsync);
    }

    /// <param name="head">Sent before the rows: the CSV header line, or the JSON body's opening.</param>
    /// <param name="row">Row i (from 0) as sent, with its separator.</param>
    public static async Task<EndlessUpload> StartAsync(Uri address, string path, string contentType, string head, Func<long, string> row)
    {
        var connection = new TcpClient { NoDelay = true };
        await connection.ConnectAsync(address.Host, address.Port);
        string request = $"POST {path} HTTP/1.1\r\nHost: {address.Authority}\r\nContent-Type: {contentType}\r\nTransfer-Encoding: chunked\r\n\r\n";
        return new EndlessUpload(connection, request, head, row);
    }

    /// <summary>Waits until the answer's body so far satisfies <paramref name="condition"/>.</summary>
    public async Task WaitForBodyAsync(Func<string, bool> condition, TimeSpan timeout)
    {
        var deadline = DateTime.UtcNow + timeout;
        while (true)
        {
            Task next;
            lock (received)
            {
                var answer = Decode();
                if (condition(answer.Body))
                {
                    return;
                }

                if (answer.Ended || closed)
                {
                    throw new InvalidOperationException($"the answer ended before the condition held:\n{answer.Head}\n{Tail(answer.Body)}");
                }

                next = progress.Task;
            }

            var left = deadline - DateTime.UtcNow;
            if (left <= TimeSpan.Zero || await Task.WhenAny(next, Task.Delay(left)) != next)
            {
                throw new TimeoutException($"the answer did not reach the condition within {timeout.TotalSeconds} s:\n{Tail(Answer().Body)}");
            }
        }
    }

    /// <summary>
    /// Waits for the chunked terminator or for the socket to close, whichever comes first; then stops sending and,
    /// as a client holding the whole answer does, hangs up.
    /// </summary>
    public async Task<HttpAnswer> ReadToEndAsync(TimeSpan timeout)
    {
        var deadline = DateTime.UtcNow + timeout;
        while (true)
        {
            Task next;
            lock (received)
            {
                var answer = Decode();
                if (answer.Ended || closed)
                {
                    stop.Cancel();
                    connection.Client.Close();
                    return answer;
                }

                next = progress.Task;
            }

            var left = deadline - DateTime.UtcNow;
            if (left <= TimeSpan.Zero || await Task.WhenAny(next, Task.Delay(left)) != next)
            {
                throw new TimeoutException($"the answer did not end within {timeout.TotalSeconds} s:\n{Tail(Answer().Body)}");
            }
        }
    }

    public async ValueTask DisposeAsync()
    {
        stop.Cancel();
        connection.Dispose();
        await Task.WhenAll(writing, reading);
        stop.Dispose();
    }

    private HttpAnswer Answer()
    {
        lock (received)
        {
            return Decode();
        }
    }

    private static string Tail(string body) => body.Length > 2000 ? "…" + body[^2000..] : body;

    private async Task WriteAsync(string request, string head, Func<long, string> row)
    {
        try
        {
            await SendAsync(Encoding.ASCII.GetBytes(request));
            var chunk = new StringBuilder(head);
            for (long i = 0; !stop.IsCancellationRequested; i++)
            {
                chunk.Append(row(i));
                if (i % 32 == 31)
                {
                    await SendChunkAsync(chunk.ToString());
                    chunk.Clear();

                    // Paced like an export, so that the service plans as the rows come rather than far behind them.
                    await Task.Delay(2, stop.Token);
                }
            }
        }
        catch (Exception e) when (e is IOException or SocketException or ObjectDisposedException or OperationCanceledException)
        {
            // The service closed the connection, or the test is done: either way the upload ends here.
        }
    }

    private async Task SendChunkAsync(string text)
    {
        byte[] data = Encoding.UTF8.GetBytes(text);
        await SendAsync(Encoding.ASCII.GetBytes(data.Length.ToString("x", CultureInfo.InvariantCulture) + "\r\n"));
        await SendAsync(data);
        await SendAsync("\r\n"u8.ToArray());
    }

    private async Task SendAsync(byte[] data) => await stream.WriteAsync(data, stop.Token);

    private async Task ReadAsync()
    {
        var buffer = new byte[16 * 1024];
        try
        {
            while (true)
            {
                int read = await stream.ReadAsync(buffer);
                if (read == 0)
                {
                    break;
                }

                lock (received)
                {
                    received.Write(buffer, 0, read);
                    Signal();
                }
            }
        }
        catch (Exception e) when (e is IOException or SocketException or ObjectDisposedException)
        {
            // A reset after the last byte still leaves what was received to judge.
        }

        lock (received)
        {
            closed = true;
            Signal();
        }
    }

    private void Signal()
    {
        var done = progress;
        progress = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        done.TrySetResult();
    }

    /// <summary>The status line and headers, and the chunked body decoded so far; Ended once the zero-length chunk came.</summary>
    private HttpAnswer Decode()
    {
        var bytes = received.GetBuffer().AsSpan(0, (int)received.Length);
        int headEnd = bytes.IndexOf("\r\n\r\n"u8);
        if (headEnd < 0)
        {
            return new HttpAnswer(Encoding.ASCII.GetString(bytes), "", false);
        }

        string head = Encoding.ASCII.GetString(bytes[..headEnd]);
        var body = new MemoryStream();
        int at = headEnd + 4;
        while (true)
        {
            int lineEnd = bytes[at..].IndexOf("\r\n"u8);
            if (lineEnd < 0)
            {
                break;
            }

            string sizeText = Encoding.ASCII.GetString(bytes.Slice(at, lineEnd)).Split(';')[0].Trim();
            int size = int.Parse(sizeText, NumberStyles.HexNumber, CultureInfo.InvariantCulture);
            if (size == 0)
            {
                return new HttpAnswer(head, Encoding.UTF8.GetString(body.ToArray()), true);
            }

            int dataStart = at + lineEnd + 2;
            if (dataStart + size + 2 > bytes.Length)
            {
                break;
            }

            body.Write(bytes.Slice(dataStart, size));
            at = dataStart + size + 2;
        }

        return new HttpAnswer(head, Encoding.UTF8.GetString(body.ToArray()), false);
    }
}

/// <summary>An answer read off the wire: Ended is true only when the chunked body's terminator arrived.</summary>
public sealed record HttpAnswer(string Head, string Body, bool Ended);
