using System.Net;
using System.Net.Sockets;
using System.Text;
using Lookahead.Api.Hosting;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>
/// Hostile paths through the real HTTP server, which parses them before the service sees them (the in-memory host
/// does not): a 10,000-character id reaches its route and is refused with a problem naming it; a NUL in the decoded
/// path and a request line past the limit are refused by Kestrel itself, before any middleware, with a bare 400 and
/// 414 that carry no problem document (Kestrel's own refusals cannot be rewritten by the application).
/// </summary>
public class HostilePathsOverHttpTests
{
    [Fact]
    public async Task Long_ids_reach_their_route_and_nul_or_overlong_request_lines_are_refused_by_the_server()
    {
        await using var store = ServiceStore.Sqlite();
        using var service = await ServiceProcess.StartAsync(store);
        using var client = service.CreateClient();

        var longId = await client.GetAsync("/v1/models/" + new string('a', 10_000) + "/gain");
        Assert.Contains(await longId.ReadProblemAsync(HttpStatusCode.BadRequest), e => e.Path == "id");
        var longName = await client.PostJsonAsync("/v1/stations/" + new string('s', 10_000) + "/step", """{"sequence":0}""");
        Assert.Contains(await longName.ReadProblemAsync(HttpStatusCode.BadRequest), e => e.Path == "name");

        var (nulStatus, nulBody) = await RawGetAsync(service.Address, "/v1/models/" + new string('a', 32) + "%00" + new string('a', 31));
        Assert.Equal(400, nulStatus);
        Assert.Equal("", nulBody);

        var (overlongStatus, _) = await RawGetAsync(service.Address, "/v1/models/" + new string('a', ServiceCollectionExtensions.MaxRequestLineBytes));
        Assert.Equal(414, overlongStatus);

        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/health/ready")).StatusCode);
    }

    /// <summary>A GET written on a socket, so the path goes out exactly as given (HttpClient would not send some of these).</summary>
    private static async Task<(int Status, string Body)> RawGetAsync(Uri address, string path)
    {
        using var socket = new TcpClient();
        await socket.ConnectAsync(address.Host, address.Port);
        var stream = socket.GetStream();
        await stream.WriteAsync(Encoding.ASCII.GetBytes($"GET {path} HTTP/1.1\r\nHost: {address.Authority}\r\nConnection: close\r\n\r\n"));
        using var reader = new StreamReader(stream, Encoding.UTF8);
        string answer = await reader.ReadToEndAsync();
        int status = int.Parse(answer.Split(' ', 3)[1], System.Globalization.CultureInfo.InvariantCulture);
        int blank = answer.IndexOf("\r\n\r\n", StringComparison.Ordinal);
        return (status, blank < 0 ? "" : answer[(blank + 4)..]);
    }
}
