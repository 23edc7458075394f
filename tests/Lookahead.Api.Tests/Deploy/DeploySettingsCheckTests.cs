using Xunit;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>The settings check fails where it should: on a folder with a misspelt key in each kind of file, and on bad values.</summary>
[Collection(DeployFixture.Collection)]
public sealed class DeploySettingsCheckTests(DeployFixture deploy) : IDisposable
{
    private readonly string root = Directory.CreateTempSubdirectory("lookahead-deploy-check-").FullName;

    [Fact]
    public void Reports_a_misspelt_key_in_every_kind_of_file_with_its_line()
    {
        Write("deploy/Dockerfile", "FROM base AS build\nENV Lookahead__Cahce__SizeLimitBytes=1\nFROM base\nENV Lookahead__Urls=http://+:8080 \\\n    Lookahead__Stor__Provider=sqlite\nUSER 1000\n");
        Write("deploy/compose.yaml", "services:\n  lookahead:\n    image: lookahead:local\n    environment:\n      Lookahead__Limits__MaxBodyByte: \"1024\"\n");
        Write("deploy/kubernetes/app.yaml", """
            apiVersion: v1
            kind: ConfigMap
            metadata:
              name: settings
            data:
              Lookahead__Replay__BatchSise: "10"
            ---
            apiVersion: apps/v1
            kind: Deployment
            metadata:
              name: app
            spec:
              template:
                spec:
                  containers:
                    - name: app
                      image: registry.example/lookahead:1
                      envFrom:
                        - configMapRef:
                            name: settings
                      env:
                        - name: Stations__HistoryLenght
                          value: "5"
            """);
        Write("deploy/app.service", "[Service]\nEnvironment=\"Lookahead__Demo__Enable=false\"\nExecStart=/usr/bin/dotnet /opt/Lookahead.Api.dll --RateLimiting:Permits 5\n");
        Write("deploy/overlay.json", "{\n  \"Cache\": {\n    \"SizeLimit\": 5\n  }\n}\n");

        var units = ServiceUnits.Collect(new DeployFolder(root));
        var unread = DeploySettingsCheck.UnreadSettings(units, deploy.Registrations.Surface, PlannedSettings.Read());

        string[] expected =
            [
                "deploy/app.service:2: Lookahead__Demo__Enable sets 'Demo:Enable', which the service does not read",
                "deploy/app.service:3: --RateLimiting:Permits sets 'RateLimiting:Permits', which the service does not read",
                "deploy/compose.yaml:5: Lookahead__Limits__MaxBodyByte sets 'Limits:MaxBodyByte', which the service does not read",
                "deploy/Dockerfile:5: Lookahead__Stor__Provider sets 'Stor:Provider', which the service does not read",
                "deploy/kubernetes/app.yaml:6: ConfigMap settings key Lookahead__Replay__BatchSise sets 'Replay:BatchSise', which the service does not read",
                "deploy/kubernetes/app.yaml:22: Stations__HistoryLenght sets 'Stations:HistoryLenght', which the service does not read",
                "deploy/overlay.json:3: Cache:SizeLimit sets 'Cache:SizeLimit', which the service does not read",
            ];
        Assert.Equal(expected.Order(StringComparer.Ordinal), unread.Order(StringComparer.Ordinal));
    }

    [Fact]
    public void Accepts_keys_the_service_reads_in_any_case_and_by_either_environment_form()
    {
        Write("deploy/compose.yaml", "services:\n  lookahead:\n    image: lookahead\n    environment:\n      - LOOKAHEAD__STORE__PROVIDER=sqlite\n      - Cache__SizeLimitBytes=4096\n      - Serilog__MinimumLevel__Override__System=Error\n      - URLS=http://+:8080\n");

        var units = ServiceUnits.Collect(new DeployFolder(root));

        Assert.Empty(DeploySettingsCheck.UnreadSettings(units, deploy.Registrations.Surface, PlannedSettings.Read()));
        Assert.Equal(4, Assert.Single(units).Settings.Count);
    }

    [Fact]
    public void Reports_values_the_service_would_refuse_at_start()
    {
        Write("deploy/compose.yaml", "services:\n  bad-provider:\n    image: lookahead\n    environment:\n      Lookahead__Store__Provider: Postgres\n  no-connection:\n    image: lookahead\n    environment:\n      Lookahead__Store__Provider: postgres\n  not-a-number:\n    image: lookahead\n    environment:\n      Lookahead__Cache__SizeLimitBytes: 1g\n  fine:\n    image: lookahead\n    environment:\n      Lookahead__Cache__SizeLimitBytes: \"4096\"\n");

        var units = ServiceUnits.Collect(new DeployFolder(root));
        var invalid = DeploySettingsCheck.InvalidSettings(units, deploy.Registrations, deploy.ServiceAppSettings, PlannedSettings.Read());

        Assert.Contains(invalid, m => m.StartsWith("compose service bad-provider", StringComparison.Ordinal) && m.Contains("Store:Provider must be 'sqlite' or 'postgres'", StringComparison.Ordinal));
        Assert.Contains(invalid, m => m.StartsWith("compose service no-connection", StringComparison.Ordinal) && m.Contains("Store:PostgresConnectionString is required", StringComparison.Ordinal));
        Assert.Contains(invalid, m => m.StartsWith("compose service not-a-number", StringComparison.Ordinal) && m.Contains("Cache:SizeLimitBytes", StringComparison.Ordinal));
        Assert.DoesNotContain(invalid, m => m.StartsWith("compose service fine", StringComparison.Ordinal));
        Assert.Equal(3, invalid.Count);
    }

    [Fact]
    public void Refuses_what_it_cannot_read_instead_of_skipping_it()
    {
        Write("deploy/compose.yaml", "services:\n  lookahead:\n    image: lookahead\n    env_file: lookahead.env\n");

        var error = Assert.Throws<NotSupportedException>(() => ServiceUnits.Collect(new DeployFolder(root)));

        Assert.Contains("deploy/compose.yaml:4", error.Message, StringComparison.Ordinal);
    }

    public void Dispose() => Directory.Delete(root, recursive: true);

    private void Write(string file, string text)
    {
        string path = Path.Combine(root, file);
        Directory.CreateDirectory(Path.GetDirectoryName(path)!);
        File.WriteAllText(path, text);
    }
}
