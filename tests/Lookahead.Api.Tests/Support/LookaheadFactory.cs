using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Mvc.Testing;

namespace Lookahead.Api.Tests.Support;

/// <summary>
/// The service in memory with its own SQLite file in a temp folder (deleted on dispose). Pass a path to reopen
/// the file of an earlier instance, as a restart would.
/// </summary>
public sealed class LookaheadFactory : WebApplicationFactory<Program>
{
    private readonly Dictionary<string, string?> settings;
    private readonly string? ownedFolder;

    public LookaheadFactory(IDictionary<string, string?>? settings = null, string? databasePath = null)
    {
        this.settings = new Dictionary<string, string?>(settings ?? new Dictionary<string, string?>());
        if (databasePath is null)
        {
            ownedFolder = Directory.CreateTempSubdirectory("lookahead-api-tests-").FullName;
            databasePath = Path.Combine(ownedFolder, "lookahead.db");
        }

        DatabasePath = databasePath;
    }

    public string DatabasePath { get; }

    /// <summary>Keeps the database file when this instance is disposed (for restart tests that reopen it).</summary>
    public bool KeepDatabase { get; init; }

    protected override void ConfigureWebHost(IWebHostBuilder builder)
    {
        builder.UseEnvironment("Testing");
        builder.UseSetting("Store:Provider", "sqlite");
        builder.UseSetting("Store:SqlitePath", DatabasePath);
        builder.UseSetting("Serilog:MinimumLevel:Default", "Warning");
        foreach (var (key, value) in settings)
        {
            builder.UseSetting(key, value);
        }
    }

    public override async ValueTask DisposeAsync()
    {
        await base.DisposeAsync();
        if (ownedFolder is not null && !KeepDatabase)
        {
            try
            {
                Directory.Delete(ownedFolder, recursive: true);
            }
            catch (IOException)
            {
                // A pooled SQLite handle may linger for a moment; the temp folder is cleaned by the OS later.
            }
        }
    }
}
