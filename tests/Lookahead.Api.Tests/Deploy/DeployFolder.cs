using YamlDotNet.RepresentationModel;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>
/// The files of deploy/, each read as what it is: YAML (Kubernetes objects, the compose file), the Dockerfile, the
/// systemd unit, appsettings overlays (JSON), the nginx configuration. Paths are relative to the repository root
/// with '/' separators, as messages show them.
/// </summary>
public sealed class DeployFolder
{
    private readonly Lazy<IReadOnlyList<(string File, YamlDocument Document)>> yaml;

    public DeployFolder(string repositoryRoot, string folder = "deploy")
    {
        RepositoryRoot = repositoryRoot;
        var root = Path.Combine(repositoryRoot, folder);
        Files = Directory.EnumerateFiles(root, "*", SearchOption.AllDirectories)
            .Select(path => Path.GetRelativePath(repositoryRoot, path).Replace(Path.DirectorySeparatorChar, '/'))
            .Order(StringComparer.Ordinal)
            .ToArray();
        yaml = new(() => [.. YamlFiles.SelectMany(file => YamlNodes.Load(Read(file)).Select(document => (file, document)))]);
    }

    public string RepositoryRoot { get; }

    public IReadOnlyList<string> Files { get; }

    public IEnumerable<string> YamlFiles => Files.Where(f => f.EndsWith(".yaml", StringComparison.Ordinal) || f.EndsWith(".yml", StringComparison.Ordinal));

    /// <summary>appsettings overlays: JSON files an operator layers over the service's appsettings.json.</summary>
    public IEnumerable<string> SettingsFiles => Files.Where(f => f.EndsWith(".json", StringComparison.Ordinal));

    public IEnumerable<string> SystemdUnits => Files.Where(f => f.EndsWith(".service", StringComparison.Ordinal));

    public IEnumerable<string> NginxConfigs => Files.Where(f => f.EndsWith(".conf", StringComparison.Ordinal));

    public IEnumerable<string> Dockerfiles => Files.Where(f => Path.GetFileName(f) == "Dockerfile");

    /// <summary>Every YAML document of every YAML file; reading it throws on the first file that does not parse.</summary>
    public IReadOnlyList<(string File, YamlDocument Document)> YamlDocuments => yaml.Value;

    /// <summary>Documents with apiVersion and kind.</summary>
    public IEnumerable<KubernetesObject> KubernetesObjects =>
        YamlDocuments
            .Where(d => d.Document.RootNode.Get("apiVersion") is not null && d.Document.RootNode.Get("kind") is not null)
            .Select(d => new KubernetesObject(d.File, d.Document.RootNode));

    /// <summary>Documents with a top-level services mapping.</summary>
    public IEnumerable<(string File, YamlNode Root)> ComposeFiles =>
        YamlDocuments.Where(d => d.Document.RootNode.Get("services") is YamlMappingNode).Select(d => (d.File, d.Document.RootNode));

    public string Read(string file) => System.IO.File.ReadAllText(Path.Combine(RepositoryRoot, file));

    public bool Exists(string file) => System.IO.File.Exists(Path.Combine(RepositoryRoot, file));
}

/// <summary>One Kubernetes object from a manifest.</summary>
public sealed record KubernetesObject(string File, YamlNode Root)
{
    public string Kind => Root.Get("kind").Text() ?? "";

    public string Name => Root.At("metadata", "name").Text() ?? "";

    public DeployLocation Location => new(File, Root.LineOf());

    public override string ToString() => $"{Kind} {Name} ({Location})";
}
