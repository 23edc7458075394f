using Npgsql;
using Xunit;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>deploy/compose.yaml: three replicas of the service on one PostgreSQL, behind nginx, wired to each other.</summary>
[Collection(DeployFixture.Collection)]
public class ComposeFileTests(DeployFixture deploy)
{
    private (string File, YamlDotNet.RepresentationModel.YamlNode Root) Compose => Assert.Single(deploy.Folder.ComposeFiles);

    private IEnumerable<(string Name, YamlDotNet.RepresentationModel.YamlNode Service)> OtherServices(string imageRepository) =>
        Compose.Root.Get("services").Entries()
            .Where(e => e.Value.Get("image").Text() is { } image && ImageName.Repository(image) == imageRepository)
            .Select(e => (e.Key.Value!, e.Value));

    [Fact]
    public void Runs_three_replicas_of_the_service()
    {
        var services = ServiceUnits.ComposeServices(Compose.Root).ToList();

        int replicas = services.Sum(s => int.Parse(s.Service.At("deploy", "replicas").Text() ?? "1", System.Globalization.CultureInfo.InvariantCulture));

        Assert.True(replicas >= 3, $"{Compose.File}: {replicas} replica(s) of the service; three are asked for");
    }

    [Fact]
    public void Every_replica_uses_the_compose_PostgreSQL_as_its_store()
    {
        var postgres = Assert.Single(OtherServices("postgres"));
        string database = postgres.Service.At("environment", "POSTGRES_DB").Text() ?? "postgres";
        string user = postgres.Service.At("environment", "POSTGRES_USER").Text() ?? "postgres";

        foreach (var unit in deploy.Units.Where(u => u.Name.StartsWith("compose service ", StringComparison.Ordinal)))
        {
            var settings = unit.AsConfiguration();
            Assert.Equal("postgres", settings.GetValueOrDefault("Store:Provider"));
            var connection = new NpgsqlConnectionStringBuilder(settings.GetValueOrDefault("Store:PostgresConnectionString"));
            Assert.Equal(postgres.Name, connection.Host);
            Assert.Equal(database, connection.Database);
            Assert.Equal(user, connection.Username);
        }
    }

    [Fact]
    public void Nginx_proxies_to_the_service_with_a_configuration_from_deploy()
    {
        var nginx = Assert.Single(OtherServices("nginx"));
        var mounted = nginx.Service.Get("volumes").Items()
            .Select(v => v.Text()!.Split(':'))
            .Single(parts => parts.Length >= 2 && parts[1] == "/etc/nginx/nginx.conf");
        string file = Path.GetRelativePath(deploy.Folder.RepositoryRoot, Path.GetFullPath(Path.Combine(deploy.Folder.RepositoryRoot, Path.GetDirectoryName(Compose.File)!, mounted[0]))).Replace('\\', '/');
        Assert.True(deploy.Folder.Exists(file), $"{Compose.File}: nginx mounts {mounted[0]}, which is not in deploy/");

        var servers = NginxDirective.All(NginxDirective.Parse(deploy.Folder.Read(file)))
            .Where(d => d.Name == "upstream")
            .SelectMany(u => u.Block!.Where(d => d.Name == "server"))
            .Select(d => d.Arguments[0])
            .ToList();
        Assert.NotEmpty(servers);
        foreach (var (name, _) in ServiceUnits.ComposeServices(Compose.Root))
        {
            var listen = ListenUri(name);
            Assert.Contains($"{name}:{listen.Port}", servers);
        }
    }

    [Fact]
    public void Stop_grace_period_covers_the_hosts_shutdown_timeout()
    {
        foreach (var (name, service) in ServiceUnits.ComposeServices(Compose.Root))
        {
            var grace = service.Get("stop_grace_period");
            Assert.True(grace is not null, $"{Compose.File}: service {name} keeps compose's 10 s stop grace period, shorter than the host's {deploy.Registrations.ShutdownTimeout.TotalSeconds} s");
            Assert.True(
                ComposeDuration.Parse(grace.Text()!) > deploy.Registrations.ShutdownTimeout,
                $"{Compose.File}:{grace.LineOf()}: stop_grace_period {grace.Text()} does not exceed the host's shutdown timeout ({deploy.Registrations.ShutdownTimeout.TotalSeconds} s)");
        }
    }

    private Uri ListenUri(string composeService)
    {
        var unit = deploy.Units.Single(u => u.Name.StartsWith($"compose service {composeService} ", StringComparison.Ordinal));
        string urls = unit.AsConfiguration().GetValueOrDefault("Urls") ?? throw new Xunit.Sdk.XunitException($"{unit} sets no Urls");
        return new Uri(urls.Split(';')[0].Replace("+", "localhost", StringComparison.Ordinal).Replace("*", "localhost", StringComparison.Ordinal));
    }
}
