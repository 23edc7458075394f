using System.Globalization;
using System.Net.Http.Headers;
using System.Runtime.CompilerServices;
using System.Text;
using System.Text.Json;
using CsvHelper;

namespace Lookahead.Client;

public sealed partial class LookaheadClient
{
    private const string SummaryMarker = "#summary";

    /// <summary>
    /// POST /v1/models/{id}/plans with rows produced as the upload goes (NDJSON): results come back in row order while
    /// later rows are still being produced. Not retried: the rows cannot be produced twice.
    /// </summary>
    public ReplayStream<ReplayRowResult> ReplayAsync(string modelId, IAsyncEnumerable<ReplayRowRequest> rows, ReplayDetail detail = ReplayDetail.FirstMove, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(rows);
        return new ReplayStream<ReplayRowResult>((owner, token) => ReadNdjsonAsync(owner, modelId, new NdjsonRowsContent(rows), detail, token), cancellationToken);
    }

    /// <summary>Replays an NDJSON stream (one plan request per line) as it is read; the stream is not disposed.</summary>
    public ReplayStream<ReplayRowResult> ReplayNdjsonAsync(string modelId, Stream ndjson, ReplayDetail detail = ReplayDetail.FirstMove, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(ndjson);
        return new ReplayStream<ReplayRowResult>((owner, token) => ReadNdjsonAsync(owner, modelId, Upload(ndjson, "application/x-ndjson"), detail, token), cancellationToken);
    }

    /// <summary>Replays an NDJSON file, streamed from disk.</summary>
    public ReplayStream<ReplayRowResult> ReplayNdjsonFileAsync(string modelId, string path, ReplayDetail detail = ReplayDetail.FirstMove, CancellationToken cancellationToken = default) =>
        new((owner, token) => FromFile(path, file => ReadNdjsonAsync(owner, modelId, Upload(file, "application/x-ndjson"), detail, token)), cancellationToken);

    /// <summary>
    /// Replays a CSV stream (state columns by label, <c>prev_</c>, <c>r_</c>, <c>v_</c>, or <c>y_</c> and
    /// <c>applied_</c> for an estimation replay; other columns pass through); the stream is not disposed. A record is
    /// handed over once the reader has seen past its line end, i.e. when the next record (or the summary) begins.
    /// </summary>
    public ReplayStream<CsvReplayRecord> ReplayCsvAsync(string modelId, Stream csv, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(csv);
        return new ReplayStream<CsvReplayRecord>((owner, token) => ReadCsvAsync(owner, modelId, Upload(csv, "text/csv"), token), cancellationToken);
    }

    /// <summary>Replays a CSV file, streamed from disk.</summary>
    public ReplayStream<CsvReplayRecord> ReplayCsvFileAsync(string modelId, string path, CancellationToken cancellationToken = default) =>
        new((owner, token) => FromFile(path, file => ReadCsvAsync(owner, modelId, Upload(file, "text/csv"), token)), cancellationToken);

    private static StreamContent Upload(Stream body, string mediaType)
    {
        var content = new NonDisposingStreamContent(body);
        content.Headers.ContentType = new MediaTypeHeaderValue(mediaType);
        return content;
    }

    private static async IAsyncEnumerable<T> FromFile<T>(string path, Func<Stream, IAsyncEnumerable<T>> replay)
    {
        await using var file = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 64 * 1024, FileOptions.Asynchronous | FileOptions.SequentialScan);
        await foreach (var item in replay(file))
        {
            yield return item;
        }
    }

    private async Task<HttpResponseMessage> StartReplayAsync(string modelId, HttpContent upload, string query, CancellationToken cancellationToken)
    {
        using var request = new HttpRequestMessage(HttpMethod.Post, Address($"v1/models/{Segment(modelId)}/plans{query}")) { Content = upload };
        var response = await SendOnceAsync(request, HttpCompletionOption.ResponseHeadersRead, cancellationToken);
        if (!response.IsSuccessStatusCode)
        {
            using (response)
            {
                throw await ReadProblemAsync(response, options.TimeProvider, cancellationToken);
            }
        }

        return response;
    }

    private async IAsyncEnumerable<ReplayRowResult> ReadNdjsonAsync(ReplayStream<ReplayRowResult> owner, string modelId, HttpContent upload, ReplayDetail detail, [EnumeratorCancellation] CancellationToken cancellationToken)
    {
        string query = detail == ReplayDetail.Full ? "?detail=full" : "";
        using var response = await StartReplayAsync(modelId, upload, query, cancellationToken);
        await using var body = await response.Content.ReadAsStreamAsync(cancellationToken);
        using var reader = new StreamReader(body, Encoding.UTF8);
        long read = 0;
        while (await ReadLineOrCutAsync(reader, read, cancellationToken) is { } line)
        {
            if (line.Length == 0)
            {
                continue;
            }

            if (line.StartsWith("{\"summary\"", StringComparison.Ordinal))
            {
                owner.Summary = JsonSerializer.Deserialize<SummaryLine>(line, ClientJson.Options)?.Summary;
                continue;
            }

            read++;
            yield return JsonSerializer.Deserialize<ReplayRowResult>(line, ClientJson.Options)
                ?? throw new InvalidDataException($"result line {read} is empty");
        }

        if (owner.Summary is null)
        {
            throw new ReplayCutException { ResultsRead = read };
        }
    }

    private static async Task<string?> ReadLineOrCutAsync(StreamReader reader, long read, CancellationToken cancellationToken)
    {
        try
        {
            return await reader.ReadLineAsync(cancellationToken);
        }
        catch (HttpRequestException ex)
        {
            throw new ReplayCutException("the replay answer broke off: " + ex.Message, ex) { ResultsRead = read };
        }
        catch (IOException ex) when (ex is not ReplayCutException)
        {
            throw new ReplayCutException("the replay answer broke off: " + ex.Message, ex) { ResultsRead = read };
        }
    }

    private async IAsyncEnumerable<CsvReplayRecord> ReadCsvAsync(ReplayStream<CsvReplayRecord> owner, string modelId, HttpContent upload, [EnumeratorCancellation] CancellationToken cancellationToken)
    {
        using var response = await StartReplayAsync(modelId, upload, "", cancellationToken);
        await using var body = await response.Content.ReadAsStreamAsync(cancellationToken);
        var readerOptions = new CsvReaderOptions
        {
            HasHeader = true,
            Separator = ',',
            FieldCountMismatch = CsvFieldCountHandling.Allow,
            MissingField = CsvMissingFieldHandling.ReturnEmpty,
            MalformedData = CsvMalformedDataHandling.Throw,
            FormatProvider = CultureInfo.InvariantCulture,
        };
        await using var csv = CsvReader.Create(body, readerOptions, leaveOpen: true);
        await csv.ReadHeaderAsync(cancellationToken);
        var header = new CsvReplayHeader(csv.Headers?.ToArray() ?? []);
        long read = 0;
        while (await ReadRecordOrCutAsync(csv, read, cancellationToken))
        {
            var fields = new string[csv.FieldCount];
            for (int i = 0; i < fields.Length; i++)
            {
                fields[i] = csv.GetString(i);
            }

            if (fields.Length > 0 && fields[0] == SummaryMarker)
            {
                owner.Summary = ParseCsvSummary(fields);
                continue;
            }

            yield return new CsvReplayRecord(header, ++read, fields);
        }

        if (owner.Summary is null)
        {
            throw new ReplayCutException { ResultsRead = read };
        }
    }

    private static async Task<bool> ReadRecordOrCutAsync(CsvReader csv, long read, CancellationToken cancellationToken)
    {
        try
        {
            return await csv.ReadAsync(cancellationToken);
        }
        catch (HttpRequestException ex)
        {
            throw new ReplayCutException("the replay answer broke off: " + ex.Message, ex) { ResultsRead = read };
        }
        catch (IOException ex) when (ex is not ReplayCutException)
        {
            throw new ReplayCutException("the replay answer broke off: " + ex.Message, ex) { ResultsRead = read };
        }
    }

    /// <summary>Reads <c>#summary,rows=…,failedRows=…,complete=…</c> (padded with empty fields).</summary>
    internal static ReplaySummary ParseCsvSummary(IReadOnlyList<string> fields)
    {
        long rows = 0, failed = 0;
        bool complete = false;
        foreach (string field in fields.Skip(1))
        {
            int eq = field.IndexOf('=', StringComparison.Ordinal);
            if (eq < 0)
            {
                continue;
            }

            string name = field[..eq], value = field[(eq + 1)..];
            switch (name)
            {
                case "rows": rows = long.Parse(value, CultureInfo.InvariantCulture); break;
                case "failedRows": failed = long.Parse(value, CultureInfo.InvariantCulture); break;
                case "complete": complete = value == "true"; break;
            }
        }

        return new ReplaySummary(rows, failed, complete, complete ? null : "shutdown");
    }

    private sealed record SummaryLine(ReplaySummary Summary);

    /// <summary>The caller owns the upload's stream; the request must not close it.</summary>
    private sealed class NonDisposingStreamContent(Stream stream) : StreamContent(new KeepOpenStream(stream))
    {
    }
}
