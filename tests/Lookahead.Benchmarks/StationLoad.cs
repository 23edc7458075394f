using System.Buffers;
using System.Diagnostics;
using System.Net;
using System.Net.Http.Headers;
using System.Text;
using System.Text.Json;
using Lookahead.Api.Catalog;
using Lookahead.Api.Http;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;

namespace Lookahead.Benchmarks;

/// <summary>
/// Load on a running service from many stations at once (<c>--station-load BASE_URL …</c>): binds N stations to a
/// model, then runs N closed loops concurrently, each against its own simulated plant (<see cref="StationPlant"/>):
/// measure, step with the station's sequence, the measurement, the input applied since the last step (the last
/// answer's first move, clamped to the input limits), the setpoint and the outdoor temperature; apply the move;
/// repeat. Each loop waits for its answer before the next step, as a real station does. After a warm-up, a
/// measuring window counts the answers that arrive in it and their latencies; the service's CPU time and its own
/// counters are read at both ends of the window. Prints one Markdown table. Exit code 1 when any answer was not
/// 200 or a station's stored sequence disagrees with its loop.
/// </summary>
public static class StationLoad
{
    private const string StepRouteTemplate = "/v1/stations/{name}/step";
    private const string PlanRouteTemplate = "/v1/models/{id}/plan";
    private static readonly MediaTypeHeaderValue Json = new("application/json");

    public static async Task<int> RunAsync(IReadOnlyList<string> args, TextWriter output)
    {
        var (options, error) = StationLoadOptions.Parse(args);
        if (options is null)
        {
            await Console.Error.WriteLineAsync($"{error}\nusage: {StationLoadOptions.Usage}");
            return 2;
        }

        using var handler = new SocketsHttpHandler
        {
            // One connection per loop: a loop has one request in flight, so none waits for a connection.
            MaxConnectionsPerServer = options.Stations,
            PooledConnectionLifetime = Timeout.InfiniteTimeSpan,
            PooledConnectionIdleTimeout = TimeSpan.FromMinutes(5),
            UseProxy = false,
            UseCookies = false,
            AutomaticDecompression = DecompressionMethods.None,
        };
        using var client = new HttpClient(handler) { BaseAddress = options.BaseUrl, Timeout = TimeSpan.FromSeconds(60) };

        var (modelId, model) = await LoadModelAsync(client, options.Model);
        if (options.Route == StationLoadOptions.PlanRoute && (model.Document.Plant.C is not null || model.StateCount != model.OutputCount))
        {
            await Console.Error.WriteLineAsync("--route plan sends the measurement as the state, so the model's outputs must be its states (no plant.c)");
            return 2;
        }

        var loops = Enumerable.Range(0, options.Stations).Select(i => new StationLoop($"load-{i:D3}", new StationPlant(model, options.Seed + i))).ToArray();
        if (options.Route == StationLoadOptions.StepRoute)
        {
            foreach (var loop in loops)
            {
                await BindAsync(client, loop.Name, options.Model);
            }
        }

        string routeTemplate = options.Route == StationLoadOptions.StepRoute ? StepRouteTemplate : PlanRouteTemplate;
        var clock = Stopwatch.StartNew();
        using var stop = new CancellationTokenSource();
        var running = loops.Select(loop =>
        {
            var route = options.Route == StationLoadOptions.StepRoute ? StepRoute(client, loop) : PlanRoute(modelId);
            return Task.Run(() => RunLoopAsync(client, loop, route, clock, stop.Token));
        }).ToArray();

        await Task.Delay(TimeSpan.FromSeconds(options.Warmup));
        long windowStart = clock.ElapsedTicks;
        var before = await ServiceSnapshot.TakeAsync(client, options.ServicePid, routeTemplate);
        await Task.Delay(TimeSpan.FromSeconds(options.Seconds));
        long windowEnd = clock.ElapsedTicks;
        var after = await ServiceSnapshot.TakeAsync(client, options.ServicePid, routeTemplate);
        await stop.CancelAsync();
        await Task.WhenAll(running);

        int mismatched = options.Route == StationLoadOptions.StepRoute ? await CountStoredMismatchesAsync(client, loops) : 0;
        var report = LoadReport.From(options, loops, windowStart, windowEnd, before, after, mismatched);
        report.Write(output);
        return report.NonOk == 0 && mismatched == 0 ? 0 : 1;
    }

    /// <summary>
    /// The model as the service has it (alias resolved, canonical document), compiled here with the service's own
    /// core for the simulated plants; its discretisation is checked against the one the service reports.
    /// </summary>
    private static async Task<(string Id, CompiledModel Model)> LoadModelAsync(HttpClient client, string reference)
    {
        string id = reference;
        if (!ModelId.IsWellFormed(reference))
        {
            using var alias = JsonDocument.Parse(await client.GetStringAsync(new Uri($"/v1/aliases/{reference}", UriKind.Relative)));
            id = alias.RootElement.GetProperty("modelId").GetString()!;
        }

        using var details = JsonDocument.Parse(await client.GetStringAsync(new Uri($"/v1/models/{id}", UriKind.Relative)));
        var json = ApiJson.Create(new RequestLimitsOptions());
        var dto = details.RootElement.GetProperty("document").Deserialize<ModelDocumentDto>(json)!;
        var errors = new List<ValidationError>();
        var document = ModelDocumentMapping.ToCore(dto, errors);
        if (errors.Count > 0)
        {
            throw new InvalidDataException($"the service's model {id} does not map: {string.Join("; ", errors.Select(e => $"{e.Path}: {e.Reason}"))}");
        }

        var model = ModelCompiler.Compile(document);
        foreach (var (name, mine) in new[] { ("discreteA", model.DiscreteA), ("discreteB", model.DiscreteB) })
        {
            if (details.RootElement.TryGetProperty(name, out var served))
            {
                var theirs = served.Deserialize<double[][]>()!;
                double gap = mine.Zip(theirs).SelectMany(rows => rows.First.Zip(rows.Second, (a, b) => Math.Abs(a - b))).Max();
                if (gap > 1e-12)
                {
                    throw new InvalidDataException($"{name} compiled here differs from the service's by {gap}");
                }
            }
        }

        return (id, model);
    }

    private static async Task BindAsync(HttpClient client, string name, string model)
    {
        using var content = new StringContent(JsonSerializer.Serialize(new { model }), Encoding.UTF8, "application/json");
        using var response = await client.PutAsync(new Uri($"/v1/stations/{name}", UriKind.Relative), content);
        if (response.StatusCode is not (HttpStatusCode.Created or HttpStatusCode.OK))
        {
            throw new InvalidOperationException($"PUT /v1/stations/{name}: {(int)response.StatusCode} {await response.Content.ReadAsStringAsync()}");
        }
    }

    /// <summary>What one loop sends and reads back: the body for a reading, the move in the answer, what to do after a refusal.</summary>
    private sealed record LoopRoute(
        Uri Uri,
        Action<Utf8JsonWriter, StationLoop, Reading> WriteBody,
        Func<JsonElement, StationLoop, double[]?> ReadMove,
        Func<StationLoop, Task> Recover);

    /// <summary>The plant's sample as the loop sends it: thermometers, outdoor temperature, setpoint and the input applied since the last step.</summary>
    private readonly record struct Reading(double[] Measurement, double[] Disturbance, double[] Reference, double[] Applied);

    /// <summary>A station's step: its sequence and the sample; the answer carries the next sequence and the first move.</summary>
    private static LoopRoute StepRoute(HttpClient client, StationLoop loop) => new(
        new Uri($"/v1/stations/{loop.Name}/step", UriKind.Relative),
        (writer, station, reading) =>
        {
            writer.WriteNumber("sequence", station.Sequence);
            WriteVector(writer, "measurement", reading.Measurement);
            WriteVector(writer, "appliedInput", reading.Applied);
            WriteVector(writer, "reference", reading.Reference);
            WriteVector(writer, "disturbance", reading.Disturbance);
        },
        (answer, station) =>
        {
            station.Sequence = answer.GetProperty("sequence").GetInt64();
            return answer.TryGetProperty("firstMove", out var first) && first.ValueKind == JsonValueKind.Array ? ReadVector(first) : null;
        },
        // Back in step with the station (after a 409 or a lost answer), so one failure is counted once.
        async station => station.Sequence = await ReadSequenceAsync(client, station.Name) ?? station.Sequence);

    /// <summary>The comparison: a plan from the measured state, with the same setpoint, previous input and outdoor temperature.</summary>
    private static LoopRoute PlanRoute(string modelId) => new(
        new Uri($"/v1/models/{modelId}/plan", UriKind.Relative),
        (writer, _, reading) =>
        {
            WriteVector(writer, "state", reading.Measurement);
            WriteVector(writer, "previousInput", reading.Applied);
            WriteVector(writer, "reference", reading.Reference);
            WriteVector(writer, "disturbance", reading.Disturbance);
        },
        (answer, _) => ReadVector(answer.GetProperty("inputs")[0]),
        _ => Task.CompletedTask);

    /// <summary>One loop: read the plant, ask, apply the move (or hold the input when the answer has none), repeat until stopped.</summary>
    private static async Task RunLoopAsync(HttpClient client, StationLoop loop, LoopRoute route, Stopwatch clock, CancellationToken stop)
    {
        var body = new ArrayBufferWriter<byte>(512);
        var plant = loop.Plant;
        while (!stop.IsCancellationRequested)
        {
            var reading = new Reading(plant.Measure(), plant.Disturbance(), plant.Reference, plant.Input);
            body.ResetWrittenCount();
            using (var writer = new Utf8JsonWriter(body))
            {
                writer.WriteStartObject();
                route.WriteBody(writer, loop, reading);
                writer.WriteEndObject();
            }

            var (status, answer, started, finished) = await PostAsync(client, route.Uri, body, clock);
            if (status != HttpStatusCode.OK)
            {
                loop.Fail(status, answer, finished);
                await route.Recover(loop);
                continue;
            }

            using var parsed = JsonDocument.Parse(answer);
            var root = parsed.RootElement;
            double[] move = route.ReadMove(root, loop) ?? reading.Applied;
            loop.Record(started, finished, root.GetProperty("status").GetString()!, reading.Measurement, reading.Reference, reading.Applied, move);
            plant.Advance(move, reading.Disturbance);
        }
    }

    /// <summary>Posts the body; the time runs from before the request is sent to after the whole answer is read. Status 0: no answer.</summary>
    private static async Task<(HttpStatusCode Status, byte[] Answer, long Started, long Finished)> PostAsync(
        HttpClient client, Uri uri, ArrayBufferWriter<byte> body, Stopwatch clock)
    {
        using var content = new ReadOnlyMemoryContent(body.WrittenMemory);
        content.Headers.ContentType = Json;
        long started = clock.ElapsedTicks;
        try
        {
            using var response = await client.PostAsync(uri, content);
            byte[] answer = await response.Content.ReadAsByteArrayAsync();
            return (response.StatusCode, answer, started, clock.ElapsedTicks);
        }
        catch (Exception ex) when (ex is HttpRequestException or TaskCanceledException)
        {
            return (0, Encoding.UTF8.GetBytes(ex.Message), started, clock.ElapsedTicks);
        }
    }

    private static async Task<long?> ReadSequenceAsync(HttpClient client, string name)
    {
        try
        {
            using var station = JsonDocument.Parse(await client.GetStringAsync(new Uri($"/v1/stations/{name}", UriKind.Relative)));
            return station.RootElement.GetProperty("sequence").GetInt64();
        }
        catch (HttpRequestException)
        {
            return null;
        }
    }

    /// <summary>
    /// Stations whose stored sequence or step count is not where their loop left them. Every loop was answered
    /// 200 for each step it counted, so a gap would be an acknowledged step the store does not have.
    /// </summary>
    private static async Task<int> CountStoredMismatchesAsync(HttpClient client, IEnumerable<StationLoop> loops)
    {
        int mismatched = 0;
        foreach (var loop in loops)
        {
            using var station = JsonDocument.Parse(await client.GetStringAsync(new Uri($"/v1/stations/{loop.Name}", UriKind.Relative)));
            var root = station.RootElement;
            if (root.GetProperty("sequence").GetInt64() != loop.Sequence || root.GetProperty("stepCount").GetInt64() != loop.Answered)
            {
                mismatched++;
            }
        }

        return mismatched;
    }

    private static double[] ReadVector(JsonElement array) => array.EnumerateArray().Select(v => v.GetDouble()).ToArray();

    private static void WriteVector(Utf8JsonWriter writer, string name, double[] values)
    {
        writer.WriteStartArray(name);
        foreach (double v in values)
        {
            writer.WriteNumberValue(v);
        }

        writer.WriteEndArray();
    }
}
