using Lookahead.Client;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Mvc.Testing;

namespace Lookahead.Client.Tests.Support;

/// <summary>
/// The service in memory on a SQLite file of its own in a temp folder (deleted on dispose), demo model included, and
/// clients that reach it through the test server's handler.
/// </summary>
public sealed class ServiceFactory : WebApplicationFactory<Program>
{
    private readonly Dictionary<string, string?> settings;
    private readonly string folder;

    public ServiceFactory(IDictionary<string, string?>? settings = null)
    {
        this.settings = new Dictionary<string, string?>(settings ?? new Dictionary<string, string?>());
        folder = Directory.CreateTempSubdirectory("lookahead-client-tests-").FullName;
    }

    protected override void ConfigureWebHost(IWebHostBuilder builder)
    {
        builder.UseEnvironment("Testing");
        builder.UseSetting("Store:Provider", "sqlite");
        builder.UseSetting("Store:SqlitePath", Path.Combine(folder, "lookahead.db"));
        builder.UseSetting("Serilog:MinimumLevel:Default", "Warning");
        foreach (var (key, value) in settings)
        {
            builder.UseSetting(key, value);
        }
    }

    /// <summary>
    /// An HttpClient on the test server without redirect following: that handler buffers a request body to resend
    /// it, which would hold a streamed replay back until its upload ended.
    /// </summary>
    public HttpClient CreateStreamingClient() =>
        CreateClient(new WebApplicationFactoryClientOptions { AllowAutoRedirect = false, HandleCookies = false });

    public LookaheadClient CreateLookaheadClient(LookaheadClientOptions? options = null) =>
        new(CreateStreamingClient(), options);

    /// <summary>The test server's own handler, for clients that wrap it (retry tests, the command line).</summary>
    public HttpMessageHandler CreateServerHandler() => Server.CreateHandler();

    public override async ValueTask DisposeAsync()
    {
        await base.DisposeAsync();
        try
        {
            Directory.Delete(folder, recursive: true);
        }
        catch (IOException)
        {
            // A pooled SQLite handle may linger for a moment; the temp folder is cleaned by the OS later.
        }
    }
}
