using System.Collections.Concurrent;
using System.Net;
using System.Net.Sockets;
using Lookahead.Api.Tests.Support;
using Microsoft.AspNetCore.TestHost;
using Microsoft.Extensions.DependencyInjection;
using OpenTelemetry.Trace;
using Serilog.Core;
using Serilog.Events;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// One structured log line per request, and the W3C trace context: a caller's traceparent is honoured, and its trace
/// id reaches the response header, problem documents, log lines and (when configured) spans exported over OTLP.
/// </summary>
public class RequestTraceTests
{
    // A traceparent as a caller would send it: version 00, trace id, parent span id, sampled.
    private const string TraceId = "4bf92f3577b34da6a3ce929d0e0e4736";
    private const string Traceparent = $"00-{TraceId}-00f067aa0ba902b7-01";
    private const string ReplayRows = "lookahead_replay_rows_total{format=\"ndjson\",outcome=\"planned\"}";

    [Fact]
    public async Task A_plan_writes_one_request_line_with_route_status_model_plan_status_solve_time_and_the_callers_trace()
    {
        var events = new ConcurrentQueue<LogEvent>();
        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Serilog:MinimumLevel:Override:Serilog.AspNetCore"] = "Information" });
        var client = Capturing(factory, events).CreateClient();
        string id = await client.RegisterAsync(TestModels.TwoTanks);

        using var request = new HttpRequestMessage(HttpMethod.Post, $"/v1/models/{id}/plan") { Content = Support.Stations.Json("""{"state":[0.5,-0.2]}""") };
        request.Headers.Add("traceparent", Traceparent);
        var response = await client.SendAsync(request);
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal(TraceId, response.Headers.GetValues("trace-id").Single());

        var line = Assert.Single(events, e => e.Properties.TryGetValue("RequestPath", out var path) && path.ToString() == $"\"/v1/models/{id}/plan\"");
        Assert.Equal(LogEventLevel.Information, line.Level);
        Assert.Equal("\"POST\"", line.Properties["RequestMethod"].ToString());
        Assert.Equal("\"/v1/models/{id}/plan\"", line.Properties["RequestRoute"].ToString());
        Assert.Equal("200", line.Properties["StatusCode"].ToString());
        Assert.True(line.Properties.ContainsKey("Elapsed"));
        Assert.Equal($"\"{id}\"", line.Properties["ModelId"].ToString());
        Assert.Equal("\"optimal\"", line.Properties["PlanStatus"].ToString());
        Assert.True(line.Properties.ContainsKey("SolveMicroseconds"));
        Assert.Equal($"\"{TraceId}\"", line.Properties["TraceId"].ToString());
        Assert.Equal(TraceId, line.TraceId?.ToHexString());

        // Never a body: the state sent appears in no property of any line.
        Assert.DoesNotContain(events, e => e.Properties.Values.Any(v => v.ToString().Contains("-0.2", StringComparison.Ordinal)));
    }

    [Fact]
    public async Task The_request_line_records_the_status_the_client_got_when_a_handler_turns_a_fault_into_a_problem()
    {
        var events = new ConcurrentQueue<LogEvent>();
        await using var factory = new LookaheadFactory(new Dictionary<string, string?>
        {
            ["Serilog:MinimumLevel:Override:Serilog.AspNetCore"] = "Information", ["Demo:Enabled"] = "false",
        });
        var client = Capturing(factory, events).CreateClient();
        await client.RegisterAsync(TestModels.TwoTanks);

        // The store's file deleted under the service: registration is refused with 503 (a store fault).
        File.Delete(factory.DatabasePath);
        var refused = await client.PostJsonAsync("/v1/models", TestModels.DoubleIntegrator);
        Assert.Equal(HttpStatusCode.ServiceUnavailable, refused.StatusCode);

        var line = events.Last(e => e.Properties.TryGetValue("RequestPath", out var path) && path.ToString() == "\"/v1/models\"");
        Assert.Equal("503", line.Properties["StatusCode"].ToString());
        Assert.Equal(LogEventLevel.Warning, line.Level);
    }

    [Fact]
    public async Task A_problem_carries_the_trace_id_of_its_request_and_the_header_names_it_too()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.TwoTanks);

        using var traced = new HttpRequestMessage(HttpMethod.Post, $"/v1/models/{id}/plan") { Content = Support.Stations.Json("""{"state":[0.5]}""") };
        traced.Headers.Add("traceparent", Traceparent);
        var refused = await client.SendAsync(traced);
        var problem = await refused.ReadJsonAsync();
        Assert.Equal(TraceId, problem["traceId"]!.GetValue<string>());
        Assert.Equal(TraceId, refused.Headers.GetValues("trace-id").Single());

        // Without a caller's trace the service starts one: still 32 hex digits, the same in body and header.
        var untraced = await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[0.5]}""");
        string own = (await untraced.ReadJsonAsync())["traceId"]!.GetValue<string>();
        Assert.Matches("^[0-9a-f]{32}$", own);
        Assert.NotEqual(TraceId, own);
        Assert.Equal(own, untraced.Headers.GetValues("trace-id").Single());
    }

    [Fact]
    public async Task Spans_are_exported_over_otlp_when_an_endpoint_is_configured()
    {
        using var collector = new OtlpCollector();
        string id;
        await using (var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Telemetry:OtlpTracesEndpoint"] = collector.Endpoint }))
        {
            var client = factory.CreateClient();
            id = await client.RegisterAsync(TestModels.TwoTanks);
            using var request = new HttpRequestMessage(HttpMethod.Post, $"/v1/models/{id}/plan") { Content = Support.Stations.Json("""{"state":[0.5,-0.2]}""") };
            request.Headers.Add("traceparent", Traceparent);
            Assert.Equal(HttpStatusCode.OK, (await client.SendAsync(request)).StatusCode);
            Assert.True(factory.Services.GetRequiredService<TracerProvider>().ForceFlush(10_000));
        }

        // OTLP/HTTP carries the trace id as its 16 raw bytes.
        var exported = collector.Bodies.ToArray();
        Assert.NotEmpty(exported);
        Assert.Contains(exported, body => body.AsSpan().IndexOf(Convert.FromHexString(TraceId)) >= 0);
        Assert.All(collector.Paths, p => Assert.Equal("/v1/traces", p));
    }

    [Fact]
    public async Task Without_an_endpoint_nothing_is_exported_and_a_malformed_one_refuses_to_start()
    {
        using var collector = new OtlpCollector();
        await using (var factory = new LookaheadFactory())
        {
            var client = factory.CreateClient();
            await client.RegisterAsync(TestModels.TwoTanks);
        }

        Assert.Empty(collector.Bodies);
        await using var bad = new LookaheadFactory(new Dictionary<string, string?> { ["Telemetry:OtlpTracesEndpoint"] = "not a uri" });
        var error = Assert.ThrowsAny<Exception>(() => bad.CreateClient());
        Assert.Contains("Telemetry:OtlpTracesEndpoint", error.ToString(), StringComparison.Ordinal);
    }

    [Fact]
    public async Task Metrics_show_the_runtime_and_count_simulated_plans()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.TwoTanks);
        var run = await client.PostJsonAsync($"/v1/models/{id}/simulate", """{"initialState":[0.5,-0.2],"steps":12}""");
        Assert.Equal(HttpStatusCode.OK, run.StatusCode);

        string text = await client.GetStringAsync("/metrics");
        Assert.Contains("dotnet_collection_count_total{generation=\"0\"}", text, StringComparison.Ordinal);
        Assert.Contains("process_working_set_bytes ", text, StringComparison.Ordinal);
        Assert.Contains("process_num_threads ", text, StringComparison.Ordinal);
        Assert.Equal(12, await Metrics.ReadAsync(client, "lookahead_simulated_plans_total{outcome=\"optimal\"}"));
    }

    [Fact]
    public async Task A_replay_cut_short_still_counts_the_rows_it_wrote()
    {
        await using var store = ServiceStore.Sqlite();
        using var service = await ServiceProcess.StartAsync(store, new Dictionary<string, string> { ["Replay:BatchSize"] = "10" });
        using var client = service.CreateClient();
        string id = await client.RegisterAsync(TestModels.TwoTanks);

        // 50 rows of a chunked upload, then the historian's connection drops without ending the body.
        using (var socket = new TcpClient())
        {
            await socket.ConnectAsync(service.Address.Host, service.Address.Port);
            var stream = socket.GetStream();
            var rows = string.Concat(Enumerable.Repeat("{\"state\":[0.5,-0.2]}\n", 50));
            string request = $"POST /v1/models/{id}/plans HTTP/1.1\r\nHost: {service.Address.Authority}\r\nContent-Type: application/x-ndjson\r\n" +
                $"Transfer-Encoding: chunked\r\n\r\n{System.Text.Encoding.UTF8.GetByteCount(rows):x}\r\n{rows}\r\n";
            await stream.WriteAsync(System.Text.Encoding.UTF8.GetBytes(request));
            await stream.FlushAsync();
            for (int i = 0; i < 400 && await Metrics.ReadAsync(client, ReplayRows) < 50; i++)
            {
                await Task.Delay(25);
            }
        }

        // The replay never completed, yet every row it planned and wrote is counted.
        Assert.Equal(50, await Metrics.ReadAsync(client, ReplayRows));
    }

    private static Microsoft.AspNetCore.Mvc.Testing.WebApplicationFactory<Program> Capturing(LookaheadFactory factory, ConcurrentQueue<LogEvent> events) =>
        factory.WithWebHostBuilder(b => b.ConfigureTestServices(s => s.AddSingleton<ILogEventSink>(new CapturingSink(events))));

    private sealed class CapturingSink(ConcurrentQueue<LogEvent> events) : ILogEventSink
    {
        public void Emit(LogEvent logEvent) => events.Enqueue(logEvent);
    }

    /// <summary>A stand-in OTLP/HTTP receiver on loopback: keeps each request's path and body and answers 200.</summary>
    private sealed class OtlpCollector : IDisposable
    {
        private readonly HttpListener listener = new();
        private readonly Task serving;

        public OtlpCollector()
        {
            var probe = new TcpListener(IPAddress.Loopback, 0);
            probe.Start();
            int port = ((IPEndPoint)probe.LocalEndpoint).Port;
            probe.Stop();
            Endpoint = $"http://127.0.0.1:{port}/v1/traces";
            listener.Prefixes.Add($"http://127.0.0.1:{port}/");
            listener.Start();
            serving = Task.Run(ServeAsync);
        }

        public string Endpoint { get; }

        public ConcurrentQueue<byte[]> Bodies { get; } = new();

        public ConcurrentQueue<string> Paths { get; } = new();

        public void Dispose()
        {
            listener.Close();
            try
            {
                serving.Wait(TimeSpan.FromSeconds(5));
            }
            catch (AggregateException)
            {
                // The listener closing ends the loop with an exception; nothing to keep.
            }
        }

        private async Task ServeAsync()
        {
            while (listener.IsListening)
            {
                HttpListenerContext context;
                try
                {
                    context = await listener.GetContextAsync();
                }
                catch (Exception ex) when (ex is HttpListenerException or ObjectDisposedException)
                {
                    return;
                }

                using var body = new MemoryStream();
                await context.Request.InputStream.CopyToAsync(body);
                Paths.Enqueue(context.Request.Url!.AbsolutePath);
                Bodies.Enqueue(body.ToArray());
                context.Response.StatusCode = 200;
                context.Response.Close();
            }
        }
    }
}
