using System.Net;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>deploy/Dockerfile: a build stage and a runtime stage, a non-root user, a health check on a path the service serves.</summary>
[Collection(DeployFixture.Collection)]
public class DockerfileTests(DeployFixture deploy)
{
    private const string File = "deploy/Dockerfile";

    private IReadOnlyList<DockerfileInstruction> Instructions => DockerfileInstruction.Parse(deploy.Folder.Read(File));

    /// <summary>The instructions of the last stage, where the image the service runs in is made.</summary>
    private IReadOnlyList<DockerfileInstruction> RuntimeStage
    {
        get
        {
            var instructions = Instructions;
            int lastFrom = instructions.Select((instruction, index) => (instruction, index)).Last(x => x.instruction.Keyword == "FROM").index;
            return [.. instructions.Skip(lastFrom)];
        }
    }

    [Fact]
    public void Builds_in_one_stage_and_runs_in_another()
    {
        var stages = Instructions.Where(i => i.Keyword == "FROM").ToList();

        Assert.True(stages.Count >= 2, $"{File} has {stages.Count} FROM; a multi-stage build needs at least two");
        Assert.Contains(RuntimeStage, i => i.Keyword == "COPY" && i.Arguments.StartsWith("--from=", StringComparison.Ordinal));
        Assert.DoesNotContain("/sdk", stages[^1].Arguments, StringComparison.Ordinal);
    }

    [Fact]
    public void Runs_as_a_user_other_than_root()
    {
        var user = RuntimeStage.LastOrDefault(i => i.Keyword == "USER");

        Assert.True(user is not null, $"{File}: the runtime stage sets no USER, so the service would run as root");
        string name = user.Arguments.Split(':')[0];
        Assert.True(name is not ("root" or "0"), $"{File}:{user.Line}: USER {user.Arguments} is root");
        Assert.True(int.TryParse(name, out _), $"{File}:{user.Line}: USER {name} should be numeric so Kubernetes can check runAsNonRoot");
    }

    [Fact]
    public async Task Health_check_asks_a_path_the_service_serves_on_the_port_it_listens_on()
    {
        var check = RuntimeStage.LastOrDefault(i => i.Keyword == "HEALTHCHECK");
        Assert.True(check is not null, $"{File}: the runtime stage has no HEALTHCHECK");
        Assert.DoesNotContain("NONE", check.Arguments, StringComparison.Ordinal);
        var url = new Uri(DockerfileInstruction.Words(check.Arguments).Select(DockerfileInstruction.Unquote).Single(w => w.StartsWith("http://", StringComparison.Ordinal)));

        var expose = RuntimeStage.Single(i => i.Keyword == "EXPOSE");
        var listen = new Uri(ImageSetting("Urls").Replace("+", "localhost", StringComparison.Ordinal));
        Assert.Equal(expose.Arguments.Split('/')[0], listen.Port.ToString(System.Globalization.CultureInfo.InvariantCulture));
        Assert.Equal(listen.Port, url.Port);

        await using var factory = new LookaheadFactory(new Dictionary<string, string?> { ["Demo:Enabled"] = "false" });
        var answer = await factory.CreateClient().GetAsync(url.PathAndQuery);
        Assert.True(answer.StatusCode == HttpStatusCode.OK, $"{File}:{check.Line}: GET {url.PathAndQuery} answered {(int)answer.StatusCode}");
    }

    [Fact]
    public void Copies_only_what_exists_in_the_repository()
    {
        var missing = Instructions
            .Where(i => i.Keyword == "COPY" && !i.Arguments.StartsWith("--", StringComparison.Ordinal))
            .SelectMany(i => DockerfileInstruction.Words(i.Arguments).SkipLast(1).Select(source => (i.Line, Source: source)))
            .Where(c => !System.IO.File.Exists(Path.Combine(Repository.Root, c.Source)) && !Directory.Exists(Path.Combine(Repository.Root, c.Source)))
            .Select(c => $"{File}:{c.Line}: COPY {c.Source}, which the repository root (the build context) does not have")
            .ToList();

        Assert.True(missing.Count == 0, string.Join(Environment.NewLine, missing));
    }

    private string ImageSetting(string key) =>
        deploy.Units.Single(u => u.Name.StartsWith("image built by " + File, StringComparison.Ordinal))
            .AsConfiguration().TryGetValue(key, out var value) && value is not null
            ? value
            : throw new Xunit.Sdk.XunitException($"{File} does not set {key}; the appsettings.json default listens on loopback only");
}
