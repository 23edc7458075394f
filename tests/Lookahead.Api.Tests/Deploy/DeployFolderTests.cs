using Xunit;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>Every file in deploy/ is one the deploy check reads, and reads without error.</summary>
[Collection(DeployFixture.Collection)]
public class DeployFolderTests(DeployFixture deploy)
{
    [Fact]
    public void Every_file_in_deploy_is_of_a_kind_the_check_reads()
    {
        var folder = deploy.Folder;
        var read = folder.YamlFiles.Concat(folder.SettingsFiles).Concat(folder.SystemdUnits).Concat(folder.NginxConfigs).Concat(folder.Dockerfiles)
            .Concat(folder.Files.Where(f => f.EndsWith(".dockerignore", StringComparison.Ordinal)))
            .ToHashSet(StringComparer.Ordinal);

        var unread = folder.Files.Where(f => !read.Contains(f)).ToList();

        Assert.True(unread.Count == 0, "not read by the deploy check (teach ServiceUnits/DeployFolder to read it): " + string.Join(", ", unread));
    }

    [Fact]
    public void Every_YAML_file_parses_into_at_least_one_document()
    {
        var documents = deploy.Folder.YamlDocuments;

        var empty = deploy.Folder.YamlFiles.Where(f => !documents.Any(d => d.File == f)).ToList();

        Assert.NotEmpty(documents);
        Assert.True(empty.Count == 0, "no YAML document in: " + string.Join(", ", empty));
    }

    [Fact]
    public void Every_YAML_document_is_a_Kubernetes_object_or_the_compose_file()
    {
        var unknown = deploy.Folder.YamlDocuments
            .Where(d => d.Document.RootNode.Get("kind") is null && d.Document.RootNode.Get("services") is null)
            .Select(d => $"{d.File}:{d.Document.RootNode.LineOf()}")
            .ToList();

        Assert.True(unknown.Count == 0, "neither a Kubernetes object nor a compose file: " + string.Join(", ", unknown));
    }
}
