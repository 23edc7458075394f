using System.Globalization;
using System.Net;
using System.Text;
using Lookahead.Cli;
using Lookahead.Client.Tests.Support;
using Spectre.Console;
using Xunit;

namespace Lookahead.Client.Tests.Cli;

/// <summary>
/// Ctrl+C in the middle of a replay: the tool stops the upload, keeps every row already written, exits 3, and a run
/// with --resume finishes the file against the service.
/// </summary>
public class CliInterruptTests
{
    private const int Rows = 400;
    private const int AnsweredBeforeCancel = 200;

    [Fact]
    public async Task A_replay_cancelled_midway_keeps_its_rows_and_resume_finishes_the_file()
    {
        await using var service = new ServiceFactory();
        using var folder = new TempFolder();
        string input = folder.File("export.csv");
        var text = new StringBuilder("timestamp,zone_a_temp,zone_b_temp,zone_c_temp\n");
        for (int i = 1; i <= Rows; i++)
        {
            var x = HistorianRows.State(i);
            text.Append(CultureInfo.InvariantCulture, $"{i},{x[0]:R},{x[1]:R},{x[2]:R}\n");
        }

        await File.WriteAllTextAsync(input, text.ToString());
        string output = folder.File("moves.csv");

        using var cancel = new CancellationTokenSource();
        var writer = new StringWriter();
        var console = AnsiConsole.Create(new AnsiConsoleSettings { Out = new AnsiConsoleOutput(writer), Ansi = AnsiSupport.No, Interactive = InteractionSupport.No });
        var host = new CliHost(console, new StallingReplay(service.CreateServerHandler(), cancel));
        int exit = await LookaheadCommandLine.RunAsync(["replay", Demo.Alias, input, "--out", output, "--service", service.Server.BaseAddress.ToString()], host, cancel.Token);
        Assert.True(exit == 3, writer.ToString());
        Assert.Contains("--resume", writer.ToString(), StringComparison.Ordinal);
        // The CSV reader hands over a record once it has seen past its line end, so the last answer before the stall
        // may still be unread: what is kept is every answer but at most that one, as whole lines, and nothing else.
        var kept = await File.ReadAllLinesAsync(output);
        int keptRows = kept.Length - 1;
        Assert.InRange(keptRows, AnsweredBeforeCancel - 1, AnsweredBeforeCancel);
        Assert.All(kept[1..], line => Assert.EndsWith(",optimal,", line, StringComparison.Ordinal));
        Assert.True((await File.ReadAllTextAsync(output)).EndsWith('\n'));

        var (resumed, said) = await Support.Cli.RunAsync(service, "replay", Demo.Alias, input, "--out", output, "--resume");
        Assert.True(resumed == 0, said);
        Assert.Contains($"resuming: {keptRows} rows already in", said, StringComparison.Ordinal);
        var lines = await File.ReadAllLinesAsync(output);
        Assert.Equal(Rows + 2, lines.Length);
        Assert.Equal(Enumerable.Range(1, Rows).Select(i => i.ToString(CultureInfo.InvariantCulture)), lines[1..^1].Select(l => l.Split(',')[0]));
        Assert.StartsWith($"#summary,rows={Rows},failedRows=0,complete=true", lines[^1], StringComparison.Ordinal);
    }

    /// <summary>
    /// Passes everything to the service but the replay itself, which it answers with a few rows and then a stall
    /// during which the user presses Ctrl+C (the token is cancelled); it never reads the upload.
    /// </summary>
    private sealed class StallingReplay(HttpMessageHandler service, CancellationTokenSource ctrlC) : DelegatingHandler(service)
    {
        protected override Task<HttpResponseMessage> SendAsync(HttpRequestMessage request, CancellationToken cancellationToken)
        {
            if (request.Method != HttpMethod.Post || !request.RequestUri!.AbsolutePath.EndsWith("/plans", StringComparison.Ordinal))
            {
                return base.SendAsync(request, cancellationToken);
            }

            var answer = new StringBuilder("timestamp,chiller_1,chiller_2,door_fan,cost,status,message\n");
            for (int i = 1; i <= AnsweredBeforeCancel; i++)
            {
                answer.Append(CultureInfo.InvariantCulture, $"{i},40,40,0,1.5,optimal,\n");
            }

            var content = new StreamContent(new StallAfter(Encoding.UTF8.GetBytes(answer.ToString()), ctrlC));
            content.Headers.ContentType = new System.Net.Http.Headers.MediaTypeHeaderValue("text/csv");
            return Task.FromResult(new HttpResponseMessage(HttpStatusCode.OK) { Content = content });
        }
    }

    /// <summary>Reads out its bytes, then presses Ctrl+C and waits until the read is cancelled.</summary>
    private sealed class StallAfter(byte[] bytes, CancellationTokenSource ctrlC) : Stream
    {
        private int position;

        public override bool CanRead => true;

        public override bool CanSeek => false;

        public override bool CanWrite => false;

        public override long Length => throw new NotSupportedException();

        public override long Position { get => position; set => throw new NotSupportedException(); }

        public override async ValueTask<int> ReadAsync(Memory<byte> buffer, CancellationToken cancellationToken = default)
        {
            if (position < bytes.Length)
            {
                int n = Math.Min(buffer.Length, bytes.Length - position);
                bytes.AsMemory(position, n).CopyTo(buffer);
                position += n;
                return n;
            }

            await ctrlC.CancelAsync();
            await Task.Delay(Timeout.Infinite, cancellationToken);
            return 0;
        }

        public override Task<int> ReadAsync(byte[] buffer, int offset, int count, CancellationToken cancellationToken) =>
            ReadAsync(buffer.AsMemory(offset, count), cancellationToken).AsTask();

        public override int Read(byte[] buffer, int offset, int count) => throw new NotSupportedException("read asynchronously");

        public override void Flush()
        {
        }

        public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();

        public override void SetLength(long value) => throw new NotSupportedException();

        public override void Write(byte[] buffer, int offset, int count) => throw new NotSupportedException();
    }
}
