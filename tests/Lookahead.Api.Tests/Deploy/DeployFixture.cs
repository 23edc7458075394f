using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>deploy/ read once, and the service's registrations captured once, for every deploy test.</summary>
public sealed class DeployFixture : IAsyncLifetime
{
    public const string Collection = "deploy";

    public DeployFolder Folder { get; } = new(Repository.Root);

    public string ServiceAppSettings { get; } = Path.Combine(Repository.Root, "src", "Lookahead.Api", "appsettings.json");

    public ServiceRegistrations Registrations { get; private set; } = null!;

    public IReadOnlyList<ServiceUnit> Units => units.Value;

    private readonly Lazy<IReadOnlyList<ServiceUnit>> units;

    public DeployFixture() => units = new(() => ServiceUnits.Collect(Folder));

    public async Task InitializeAsync() => Registrations = await ServiceRegistrations.CaptureAsync();

    public Task DisposeAsync() => Task.CompletedTask;
}

[CollectionDefinition(DeployFixture.Collection)]
public sealed class DeployCollection : ICollectionFixture<DeployFixture>;
