using System.Collections.Concurrent;
using System.Net;
using System.Net.Http.Headers;
using System.Security.Cryptography;
using System.Text;
using Lookahead.Api.Access;
using Lookahead.Api.Tests.Support;
using Microsoft.AspNetCore.Mvc.Testing;
using Microsoft.AspNetCore.TestHost;
using Microsoft.Extensions.DependencyInjection;
using Serilog.Core;
using Serilog.Events;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// API keys with scopes: configured by hash, 401 without a known key, 403 without the scope, problem documents both;
/// /metrics and the OpenAPI document for admin only; per-key rate limits; the key never logged; and the safe default
/// of a service without keys (loopback only unless anonymous use is allowed).
/// </summary>
public class AccessTests
{
    private const string Reader = "reader-key-6a1f0c";
    private const string Writer = "writer-key-93bd27";
    private const string Operator = "admin-key-04e8d1";

    private static readonly Dictionary<string, string?> Keys = new()
    {
        ["Auth:Keys:0:Hash"] = Hash(Reader),
        ["Auth:Keys:0:Scopes:0"] = AccessScopes.PlansRun,
        ["Auth:Keys:1:Hash"] = Hash(Writer),
        ["Auth:Keys:1:Scopes:0"] = AccessScopes.ModelsWrite,
        ["Auth:Keys:1:Scopes:1"] = AccessScopes.PlansRun,
        ["Auth:Keys:2:Hash"] = Hash(Operator),
        ["Auth:Keys:2:Scopes:0"] = AccessScopes.Admin,
    };

    [Fact]
    public async Task Each_route_needs_a_known_key_with_its_scope_and_refuses_with_problem_documents()
    {
        await using var factory = new LookaheadFactory(Keys);
        var anonymous = factory.CreateClient();
        var reader = Client(factory, Reader);
        var writer = Client(factory, Writer);

        var missing = await anonymous.PostJsonAsync("/v1/models", TestModels.TwoTanks);
        await missing.ReadProblemAsync(HttpStatusCode.Unauthorized);
        Assert.Equal("Bearer", missing.Headers.WwwAuthenticate.Single().Scheme);
        await (await Client(factory, "not-a-key").GetAsync("/v1/models")).ReadProblemAsync(HttpStatusCode.Unauthorized);

        var forbidden = await reader.PostJsonAsync("/v1/models", TestModels.TwoTanks);
        await forbidden.ReadProblemAsync(HttpStatusCode.Forbidden);
        Assert.Contains("models:write", await forbidden.Content.ReadAsStringAsync(), StringComparison.Ordinal);

        string id = await writer.RegisterAsync(TestModels.TwoTanks);
        Assert.Equal(HttpStatusCode.OK, (await reader.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[0.5,-0.2]}""")).StatusCode);
        Assert.Equal(HttpStatusCode.OK, (await reader.GetAsync($"/v1/models/{id}")).StatusCode);
        await (await reader.DeleteAsync($"/v1/models/{id}")).ReadProblemAsync(HttpStatusCode.Forbidden);
        await (await writer.GetAsync("/v1/stations")).ReadProblemAsync(HttpStatusCode.Forbidden);

        // The key may also come in its own header.
        using var byHeader = new HttpRequestMessage(HttpMethod.Post, $"/v1/models/{id}/plan") { Content = Support.Stations.Json("""{"state":[0.5,-0.2]}""") };
        byHeader.Headers.Add(ApiKeyAuthentication.KeyHeader, Reader);
        Assert.Equal(HttpStatusCode.OK, (await anonymous.SendAsync(byHeader)).StatusCode);

        // Health stays open for probes; metrics and the API description are admin's.
        Assert.Equal(HttpStatusCode.OK, (await anonymous.GetAsync("/health/ready")).StatusCode);
        await (await reader.GetAsync("/metrics")).ReadProblemAsync(HttpStatusCode.Forbidden);
        await (await reader.GetAsync("/swagger/v1/swagger.json")).ReadProblemAsync(HttpStatusCode.Forbidden);
        var admin = Client(factory, Operator);
        Assert.Equal(HttpStatusCode.OK, (await admin.GetAsync("/metrics")).StatusCode);
        Assert.Equal(HttpStatusCode.OK, (await admin.GetAsync("/v1/stations")).StatusCode);
        var document = await (await admin.GetAsync("/swagger/v1/swagger.json")).ReadJsonAsync();
        Assert.Equal("bearer", document["components"]!["securitySchemes"]![ApiKeyAuthentication.SchemeName]!["scheme"]!.GetValue<string>());
        Assert.NotNull(document["paths"]!["/v1/models"]!["post"]!["responses"]!["403"]);
    }

    [Fact]
    public async Task Rate_limits_count_per_key_and_the_log_names_the_key_by_id_only()
    {
        var events = new ConcurrentQueue<LogEvent>();
        var settings = new Dictionary<string, string?>(Keys)
        {
            ["RateLimiting:PermitLimit"] = "3",
            ["RateLimiting:WindowSeconds"] = "60",
            ["Serilog:MinimumLevel:Override:Serilog.AspNetCore"] = "Information",
        };
        await using var factory = new LookaheadFactory(settings);
        var host = factory.WithWebHostBuilder(b => b.ConfigureTestServices(s => s.AddSingleton<ILogEventSink>(new CapturingSink(events))));
        var reader = Client(host, Reader);
        var writer = Client(host, Writer);

        // All requests come from the same address; each key has its own allowance.
        for (int i = 0; i < 3; i++)
        {
            Assert.Equal(HttpStatusCode.OK, (await reader.GetAsync("/v1/models")).StatusCode);
        }

        var limited = await reader.GetAsync("/v1/models");
        Assert.Equal(HttpStatusCode.TooManyRequests, limited.StatusCode);
        Assert.Equal(HttpStatusCode.OK, (await writer.GetAsync("/v1/models")).StatusCode);

        var lines = events.Where(e => e.Properties.ContainsKey("RequestPath")).ToList();
        Assert.Contains(lines, e => e.Properties.TryGetValue("KeyId", out var k) && k.ToString() == $"\"{Hash(Reader)[..12]}\"");
        Assert.DoesNotContain(events, e => e.RenderMessage().Contains(Reader, StringComparison.Ordinal)
            || e.Properties.Values.Any(v => v.ToString().Contains(Reader, StringComparison.Ordinal) || v.ToString().Contains(Hash(Reader), StringComparison.Ordinal)));
    }

    [Theory]
    [InlineData("Auth:Keys:0:Hash", "0123")]
    [InlineData("Auth:Keys:0:Hash", "SHA256-in-capitals-is-not-a-hash-of-64-lower-case-hexadecimal-digits!")]
    [InlineData("Auth:Keys:0:Scopes:0", "plans")]
    public async Task A_malformed_key_setting_refuses_to_start_and_says_which(string key, string value)
    {
        var settings = new Dictionary<string, string?>(Keys) { [key] = value };
        await using var factory = new LookaheadFactory(settings);
        var error = Assert.ThrowsAny<Exception>(() => factory.CreateClient());
        Assert.Contains(key.StartsWith("Auth:Keys:0:Hash", StringComparison.Ordinal) ? "Auth:Keys:*:Hash" : "Auth:Keys:*:Scopes", error.ToString(), StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("http://127.0.0.1:5000", true)]
    [InlineData("http://127.8.0.1:5000", true)]
    [InlineData("http://[::1]:5000", true)]
    [InlineData("http://localhost:5000", true)]
    [InlineData("http://0.0.0.0:5000", false)]
    [InlineData("http://[::]:5000", false)]
    [InlineData("http://+:8080", false)]
    [InlineData("http://*:8080", false)]
    [InlineData("http://10.1.2.3:8080", false)]
    [InlineData("http://plant-gateway:8080", false)]
    public void Loopback_addresses_are_told_from_every_other(string address, bool loopback) =>
        Assert.Equal(loopback, AnonymousBindingGuard.IsLoopback(address));

    [Fact]
    public async Task Without_keys_the_service_refuses_every_address_but_loopback_unless_anonymous_use_is_allowed()
    {
        await using var store = ServiceStore.Sqlite();
        var refused = await Assert.ThrowsAnyAsync<Exception>(() => ServiceProcess.StartAsync(store, listenHost: "0.0.0.0"));
        Assert.Contains("Refusing to serve", refused.Message, StringComparison.Ordinal);

        using var allowed = await ServiceProcess.StartAsync(store, new Dictionary<string, string> { ["Auth:AllowAnonymous"] = "true" }, listenHost: "0.0.0.0");
        using var client = allowed.CreateClient();
        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/v1/models")).StatusCode);

        using var keyed = await ServiceProcess.StartAsync(store, Keys.ToDictionary(k => k.Key, k => k.Value!), listenHost: "0.0.0.0");
        using var anonymous = keyed.CreateClient();
        Assert.Equal(HttpStatusCode.Unauthorized, (await anonymous.GetAsync("/v1/models")).StatusCode);
    }

    [Fact]
    public async Task Forwarded_addresses_count_only_from_configured_proxies()
    {
        await using var store = ServiceStore.Sqlite();
        var limits = new Dictionary<string, string> { ["RateLimiting:PermitLimit"] = "2", ["RateLimiting:WindowSeconds"] = "60" };

        // Behind the configured proxy (loopback here) each forwarded client has its own allowance.
        using (var behind = await ServiceProcess.StartAsync(store, new Dictionary<string, string>(limits) { ["Proxies:Addresses:0"] = "127.0.0.1" }))
        {
            using var client = behind.CreateClient();
            Assert.Equal(new[] { 200, 200, 429 }, await StatusesAsync(client, "10.0.0.1", 3));
            Assert.Equal(new[] { 200 }, await StatusesAsync(client, "10.0.0.2", 1));
        }

        // From anyone else the header is ignored: a client cannot pick the address it is counted against.
        using var direct = await ServiceProcess.StartAsync(store, limits);
        using var plain = direct.CreateClient();
        Assert.Equal(new[] { 200, 200 }, await StatusesAsync(plain, "10.0.0.1", 2));
        Assert.Equal(new[] { 429 }, await StatusesAsync(plain, "10.0.0.2", 1));
    }

    private static async Task<int[]> StatusesAsync(HttpClient client, string forwardedFor, int count)
    {
        var statuses = new int[count];
        for (int i = 0; i < count; i++)
        {
            using var request = new HttpRequestMessage(HttpMethod.Get, "/v1/models");
            request.Headers.Add("X-Forwarded-For", forwardedFor);
            statuses[i] = (int)(await client.SendAsync(request)).StatusCode;
        }

        return statuses;
    }

    private static HttpClient Client(WebApplicationFactory<Program> factory, string key)
    {
        var client = factory.CreateClient();
        client.DefaultRequestHeaders.Authorization = new AuthenticationHeaderValue("Bearer", key);
        return client;
    }

    private static string Hash(string key) => Convert.ToHexStringLower(SHA256.HashData(Encoding.UTF8.GetBytes(key)));

    private sealed class CapturingSink(ConcurrentQueue<LogEvent> events) : ILogEventSink
    {
        public void Emit(LogEvent logEvent) => events.Enqueue(logEvent);
    }
}
