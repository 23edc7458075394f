using System.Globalization;
using System.Net;
using Lookahead.Api.Tests.Support;
using YamlDotNet.RepresentationModel;
using Xunit;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>deploy/kubernetes: the objects the service needs, wired to each other and to what the service really serves.</summary>
[Collection(DeployFixture.Collection)]
public class KubernetesManifestTests(DeployFixture deploy)
{
    private IReadOnlyList<KubernetesObject> Objects => [.. deploy.Folder.KubernetesObjects];

    private KubernetesObject Deployment => Assert.Single(Objects, o => o.Kind == "Deployment");

    private YamlNode Container => Assert.Single(ServiceUnits.KubernetesContainers(deploy.Folder)).Container;

    private YamlNode PodLabels => Deployment.Root.At("spec", "template", "metadata", "labels")!;

    [Theory]
    [InlineData("Deployment")]
    [InlineData("Service")]
    [InlineData("HorizontalPodAutoscaler")]
    [InlineData("ConfigMap")]
    [InlineData("Secret")]
    [InlineData("PodDisruptionBudget")]
    public void Defines_a(string kind) =>
        Assert.True(Objects.Any(o => o.Kind == kind), $"no {kind} under deploy/ (found: {string.Join(", ", Objects)})");

    [Fact]
    public void Probes_ask_the_port_the_container_serves()
    {
        var ports = Container.Get("ports").Items().ToList();
        foreach (string probe in new[] { "livenessProbe", "readinessProbe" })
        {
            var port = Container.At(probe, "httpGet", "port");
            Assert.True(port is not null, $"{Deployment}: the container has no {probe} with httpGet");
            Assert.Contains(ports, p => p.Get("name").Text() == port.Text() || p.Get("containerPort").Text() == port.Text());
        }

        var listen = new Uri(Settings.GetValueOrDefault("Urls")!.Replace("+", "localhost", StringComparison.Ordinal));
        Assert.Contains(ports, p => p.Get("containerPort").Text() == listen.Port.ToString(CultureInfo.InvariantCulture));
    }

    [Fact]
    public async Task Liveness_ignores_the_store_and_readiness_follows_it()
    {
        string live = Container.At("livenessProbe", "httpGet", "path").Text()!;
        string ready = Container.At("readinessProbe", "httpGet", "path").Text()!;

        await using (var healthy = new LookaheadFactory(new Dictionary<string, string?> { ["Demo:Enabled"] = "false" }))
        {
            var client = healthy.CreateClient();
            await AssertAnswers(client, live, HttpStatusCode.OK, "liveness, store up");
            await AssertAnswers(client, ready, HttpStatusCode.OK, "readiness, store up");
        }

        // A store that cannot be opened: the pod must leave the Service (readiness) but not be restarted (liveness).
        var blocker = Path.Combine(Path.GetTempPath(), $"lookahead-deploy-probe-{Guid.NewGuid():N}");
        await File.WriteAllTextAsync(blocker, "a file where the database folder should be");
        try
        {
            await using var broken = new LookaheadFactory(new Dictionary<string, string?> { ["Demo:Enabled"] = "false" }, Path.Combine(blocker, "db", "lookahead.db"));
            var client = broken.CreateClient();
            await AssertAnswers(client, live, HttpStatusCode.OK, "liveness, store down");
            await AssertAnswers(client, ready, HttpStatusCode.ServiceUnavailable, "readiness, store down");
        }
        finally
        {
            File.Delete(blocker);
        }
    }

    [Fact]
    public void Requests_cpu_and_memory_and_limits_memory_to_what_it_requests()
    {
        var requests = Container.At("resources", "requests");
        Assert.NotNull(requests.Get("cpu").Text());
        string memory = requests.Get("memory").Text() ?? throw new Xunit.Sdk.XunitException($"{Deployment}: no memory request");

        // A memory limit above the request lets the node evict the pod under pressure while it serves.
        Assert.Equal(memory, Container.At("resources", "limits", "memory").Text());
        Assert.True(
            long.Parse(Settings.GetValueOrDefault("Cache:SizeLimitBytes") ?? "0", CultureInfo.InvariantCulture) < KubernetesQuantity.Bytes(memory) / 2,
            $"{Deployment}: Cache:SizeLimitBytes should leave at least half of the {memory} memory for the process and the solvers (docs/sizing.md)");
    }

    [Fact]
    public void Runs_as_non_root_with_a_read_only_root_file_system()
    {
        var pod = Deployment.Root.At("spec", "template", "spec", "securityContext");
        Assert.Equal("true", pod.Get("runAsNonRoot").Text());
        string imageUser = DockerfileInstruction.Parse(deploy.Folder.Read("deploy/Dockerfile")).Last(i => i.Keyword == "USER").Arguments.Split(':')[0];
        Assert.Equal(imageUser, pod.Get("runAsUser").Text());
        Assert.Equal("false", Container.At("securityContext", "allowPrivilegeEscalation").Text());
        Assert.Equal("true", Container.At("securityContext", "readOnlyRootFilesystem").Text());
    }

    [Fact]
    public void Service_disruption_budget_and_autoscaler_point_at_the_deployment()
    {
        string port = Container.Get("ports").Items().First().Get("name").Text()!;
        var service = Assert.Single(Objects, o => o.Kind == "Service");
        Assert.True(Selects(service.Root.At("spec", "selector")), $"{service}: its selector does not match the pods of {Deployment}");
        Assert.Contains(service.Root.At("spec", "ports").Items(), p => p.Get("targetPort").Text() == port);

        var budget = Assert.Single(Objects, o => o.Kind == "PodDisruptionBudget");
        Assert.True(Selects(budget.Root.At("spec", "selector", "matchLabels")), $"{budget}: its selector does not match the pods of {Deployment}");

        var autoscaler = Assert.Single(Objects, o => o.Kind == "HorizontalPodAutoscaler");
        Assert.Equal("Deployment", autoscaler.Root.At("spec", "scaleTargetRef", "kind").Text());
        Assert.Equal(Deployment.Name, autoscaler.Root.At("spec", "scaleTargetRef", "name").Text());
        int minimum = int.Parse(autoscaler.Root.At("spec", "minReplicas").Text()!, CultureInfo.InvariantCulture);
        Assert.True(minimum >= 2, $"{autoscaler}: minReplicas {minimum} leaves the disruption budget nothing to keep");
    }

    [Fact]
    public void Every_ConfigMap_and_Secret_reaches_the_container()
    {
        var referenced = Container.Get("envFrom").Items()
            .Select(s => s.Get("configMapRef") is { } c ? ("ConfigMap", c.Get("name").Text()) : ("Secret", s.At("secretRef", "name").Text()))
            .ToHashSet();

        var unused = Objects.Where(o => o.Kind is "ConfigMap" or "Secret" && !referenced.Contains((o.Kind, o.Name))).Select(o => o.ToString()).ToList();

        Assert.True(unused.Count == 0, "not given to the service's container (envFrom): " + string.Join(", ", unused));
    }

    [Fact]
    public void Kustomization_lists_every_manifest()
    {
        var kustomization = Assert.Single(Objects, o => o.Kind == "Kustomization");
        string folder = Path.GetDirectoryName(kustomization.File)!.Replace('\\', '/');
        var listed = kustomization.Root.Get("resources").Items().Select(r => $"{folder}/{r.Text()}").Order(StringComparer.Ordinal).ToList();

        var manifests = Objects.Where(o => o.Kind != "Kustomization").Select(o => o.File).Distinct().Order(StringComparer.Ordinal).ToList();

        Assert.Equal(manifests, listed);
    }

    [Fact]
    public void Termination_grace_covers_the_pre_stop_pause_and_the_hosts_shutdown_timeout()
    {
        var spec = Deployment.Root.At("spec", "template", "spec");
        int grace = int.Parse(spec.Get("terminationGracePeriodSeconds").Text() ?? "30", CultureInfo.InvariantCulture);
        var command = Container.At("lifecycle", "preStop", "exec", "command").Items().Select(c => c.Text()).ToList();
        int pause = command is ["sleep", var seconds] ? int.Parse(seconds!, CultureInfo.InvariantCulture) : 0;

        Assert.True(
            TimeSpan.FromSeconds(grace - pause) > deploy.Registrations.ShutdownTimeout,
            $"{Deployment}: terminationGracePeriodSeconds {grace} minus the preStop pause {pause} s does not exceed the host's shutdown timeout ({deploy.Registrations.ShutdownTimeout.TotalSeconds} s)");
    }

    private async Task AssertAnswers(HttpClient client, string path, HttpStatusCode expected, string probe)
    {
        var actual = (await client.GetAsync(path)).StatusCode;
        Assert.True(actual == expected, $"{Deployment}: {probe}: GET {path} answered {(int)actual}, expected {(int)expected}");
    }

    private IReadOnlyDictionary<string, string?> Settings =>
        deploy.Units.Single(u => u.Name.StartsWith("Kubernetes Deployment ", StringComparison.Ordinal)).AsConfiguration();

    private bool Selects(YamlNode? selector) =>
        selector.Entries().Any() && selector.Entries().All(e => PodLabels.Get(e.Key.Value!).Text() == e.Value.Text());
}
