using YamlDotNet.RepresentationModel;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>
/// Finds every way deploy/ runs the service and collects what each sets for it. A construct the collector cannot
/// read (an env_file, an envFrom prefix, an EnvironmentFile) fails with its location rather than being skipped, so no
/// setting escapes the check unseen.
/// </summary>
public static class ServiceUnits
{
    public static IReadOnlyList<ServiceUnit> Collect(DeployFolder folder)
    {
        var image = ImageSettings(folder);
        var units = new List<ServiceUnit>();
        foreach (string dockerfile in folder.Dockerfiles)
        {
            units.Add(Unit($"image built by {dockerfile}", image));
        }

        foreach (var (file, root) in folder.ComposeFiles)
        {
            units.AddRange(ComposeUnits(file, root, image));
        }

        units.AddRange(KubernetesUnits(folder, image));
        foreach (string unit in folder.SystemdUnits)
        {
            units.Add(Unit($"systemd unit {unit}", SystemdSettings(unit, folder.Read(unit))));
        }

        foreach (string json in folder.SettingsFiles)
        {
            units.Add(AppSettings(json, folder.Read(json)));
        }

        return units;
    }

    /// <summary>A JSON settings file (appsettings form) as a unit of its own.</summary>
    public static ServiceUnit AppSettings(string file, string text) => Unit($"appsettings overlay {file}", JsonSettings(file, text));

    /// <summary>Compose services that run the service's image (by name, or built from deploy/'s Dockerfile).</summary>
    public static IEnumerable<(string Name, YamlNode Service)> ComposeServices(YamlNode root) =>
        root.Get("services").Entries()
            .Where(e => ImageName.IsService(e.Value.Get("image").Text()) || IsBuiltHere(e.Value))
            .Select(e => (e.Key.Value ?? "", e.Value));

    /// <summary>Containers of Deployments that run the service's image.</summary>
    public static IEnumerable<(KubernetesObject Deployment, YamlNode Container)> KubernetesContainers(DeployFolder folder) =>
        folder.KubernetesObjects
            .Where(o => o.Kind == "Deployment")
            .SelectMany(d => d.Root.At("spec", "template", "spec", "containers").Items().Select(c => (d, c)))
            .Where(x => ImageName.IsService(x.c.Get("image").Text()));

    private static bool IsBuiltHere(YamlNode service) =>
        service.At("build", "dockerfile").Text() is { } dockerfile && Path.GetFileName(dockerfile) == "Dockerfile";

    /// <summary>ENV of the Dockerfile's last stage (earlier stages only build).</summary>
    private static List<WrittenSetting> ImageSettings(DeployFolder folder)
    {
        var result = new List<WrittenSetting>();
        foreach (string dockerfile in folder.Dockerfiles)
        {
            var instructions = DockerfileInstruction.Parse(folder.Read(dockerfile));
            int lastFrom = instructions.Select((instruction, index) => (instruction, index)).Last(x => x.instruction.Keyword == "FROM").index;
            foreach (var env in instructions.Skip(lastFrom).Where(i => i.Keyword == "ENV"))
            {
                foreach (var (name, value, line) in env.EnvironmentPairs())
                {
                    result.Add(new(name, value, new DeployLocation(dockerfile, line), name));
                }
            }
        }

        return result;
    }

    private static IEnumerable<ServiceUnit> ComposeUnits(string file, YamlNode root, List<WrittenSetting> image)
    {
        foreach (var (name, service) in ComposeServices(root))
        {
            if (service.Get("env_file") is { } envFile)
            {
                throw new NotSupportedException($"{file}:{envFile.LineOf()}: env_file is not read by the deploy check; list the variables under environment");
            }

            var variables = new List<WrittenSetting>(image);
            var environment = service.Get("environment");
            if (environment is YamlMappingNode)
            {
                variables.AddRange(environment.Entries().Select(e => new WrittenSetting(e.Key.Value!, e.Value.Text(), new DeployLocation(file, e.Key.LineOf()), e.Key.Value!)));
            }
            else
            {
                foreach (var item in environment.Items())
                {
                    string text = item.Text() ?? "";
                    int equals = text.IndexOf('=', StringComparison.Ordinal);
                    string variable = equals < 0 ? text : text[..equals];
                    variables.Add(new(variable, equals < 0 ? null : text[(equals + 1)..], new DeployLocation(file, item.LineOf()), variable));
                }
            }

            var arguments = service.Get("command") is YamlScalarNode command
                ? DockerfileInstruction.Words(command.Value ?? "").Select(DockerfileInstruction.Unquote).Select(w => (w, command.LineOf()))
                : service.Get("command").Items().Select(a => (a.Text() ?? "", a.LineOf()));
            yield return Unit($"compose service {name} ({file}:{service.LineOf()})", variables, CommandLine(file, arguments));
        }
    }

    private static IEnumerable<ServiceUnit> KubernetesUnits(DeployFolder folder, List<WrittenSetting> image)
    {
        var objects = folder.KubernetesObjects.ToList();
        foreach (var (deployment, container) in KubernetesContainers(folder))
        {
            var variables = new List<WrittenSetting>(image);
            foreach (var source in container.Get("envFrom").Items())
            {
                if (source.Get("prefix") is { } prefix)
                {
                    throw new NotSupportedException($"{deployment.File}:{prefix.LineOf()}: envFrom prefix is not read by the deploy check");
                }

                var (kind, reference) = source.Get("configMapRef") is { } configMap ? ("ConfigMap", configMap) : ("Secret", source.Get("secretRef"));
                string referenced = reference.Get("name").Text() ?? throw new FormatException($"{deployment.File}:{source.LineOf()}: envFrom without a name");
                var target = objects.SingleOrDefault(o => o.Kind == kind && o.Name == referenced)
                    ?? throw new InvalidDataException($"{deployment.File}:{source.LineOf()}: envFrom names {kind} '{referenced}', which no manifest in deploy/ defines");
                variables.AddRange(DataKeys(target));
            }

            foreach (var variable in container.Get("env").Items())
            {
                string name = variable.Get("name").Text() ?? throw new FormatException($"{deployment.File}:{variable.LineOf()}: env entry without a name");
                variables.Add(new(name, variable.Get("value").Text(), new DeployLocation(deployment.File, variable.LineOf()), name));
            }

            var arguments = container.Get("args").Items().Select(a => (a.Text() ?? "", a.LineOf()));
            string containerName = container.Get("name").Text() ?? "?";
            yield return Unit($"Kubernetes Deployment {deployment.Name}, container {containerName} ({deployment.File}:{container.LineOf()})", variables, CommandLine(deployment.File, arguments));
        }
    }

    /// <summary>A ConfigMap's data or a Secret's stringData and data: each key becomes an environment variable through envFrom.</summary>
    public static IEnumerable<WrittenSetting> DataKeys(KubernetesObject configuration)
    {
        foreach (string section in new[] { "data", "stringData" })
        {
            foreach (var (key, value) in configuration.Root.Get(section).Entries())
            {
                // A Secret's data is base64; the value is decoded so it can be validated like any other.
                string? text = value.Text();
                if (section == "data" && configuration.Kind == "Secret" && text is not null)
                {
                    text = System.Text.Encoding.UTF8.GetString(Convert.FromBase64String(text));
                }

                yield return new(key.Value!, text, new DeployLocation(configuration.File, key.LineOf()), $"{configuration.Kind} {configuration.Name} key {key.Value}");
            }
        }
    }

    private static List<WrittenSetting> SystemdSettings(string file, string text)
    {
        var result = new List<WrittenSetting>();
        var lines = text.Replace("\r\n", "\n", StringComparison.Ordinal).Split('\n');
        for (int i = 0; i < lines.Length; i++)
        {
            string line = lines[i].Trim();
            var location = new DeployLocation(file, i + 1);
            if (line.StartsWith("EnvironmentFile=", StringComparison.Ordinal))
            {
                throw new NotSupportedException($"{location}: EnvironmentFile is not read by the deploy check; set Environment= lines");
            }

            if (line.StartsWith("Environment=", StringComparison.Ordinal))
            {
                foreach (string word in DockerfileInstruction.Words(line["Environment=".Length..]))
                {
                    string assignment = DockerfileInstruction.Unquote(word);
                    int equals = assignment.IndexOf('=', StringComparison.Ordinal);
                    if (equals <= 0)
                    {
                        throw new FormatException($"{location}: '{assignment}' is not NAME=value");
                    }

                    result.Add(new(assignment[..equals], assignment[(equals + 1)..], location, assignment[..equals]));
                }
            }

            if (line.StartsWith("ExecStart=", StringComparison.Ordinal))
            {
                var words = DockerfileInstruction.Words(line["ExecStart=".Length..]).Select(DockerfileInstruction.Unquote).ToList();
                int program = words.FindIndex(w => w.EndsWith("Lookahead.Api.dll", StringComparison.Ordinal) || w.EndsWith("/Lookahead.Api", StringComparison.Ordinal));
                if (program < 0)
                {
                    throw new FormatException($"{location}: ExecStart does not run Lookahead.Api");
                }

                result.AddRange(CommandLine(file, words.Skip(program + 1).Select(w => (w, i + 1))));
            }
        }

        return result;
    }

    /// <summary>Command-line settings as the service reads them: <c>--key value</c> or <c>--key=value</c>, with ':' in keys.</summary>
    private static IEnumerable<WrittenSetting> CommandLine(string file, IEnumerable<(string Word, int Line)> arguments)
    {
        var list = arguments.ToList();
        var result = new List<WrittenSetting>();
        for (int i = 0; i < list.Count; i++)
        {
            var (word, line) = list[i];
            if (!word.StartsWith("--", StringComparison.Ordinal))
            {
                throw new FormatException($"{file}:{line}: argument '{word}' is not --key value or --key=value");
            }

            int equals = word.IndexOf('=', StringComparison.Ordinal);
            if (equals > 0)
            {
                result.Add(new(word[2..equals], word[(equals + 1)..], new DeployLocation(file, line), word[..equals], IsKey: true));
            }
            else
            {
                if (i + 1 >= list.Count)
                {
                    throw new FormatException($"{file}:{line}: argument '{word}' has no value");
                }

                result.Add(new(word[2..], list[i + 1].Word, new DeployLocation(file, line), word, IsKey: true));
                i++;
            }
        }

        return result;
    }

    /// <summary>Flattens a JSON settings file into configuration keys (arrays by index), each at the line of its name.</summary>
    private static List<WrittenSetting> JsonSettings(string file, string text)
    {
        using (System.Text.Json.JsonDocument.Parse(text))
        {
            // Well-formed JSON first; YAML then reads the same text again for the lines.
        }

        var result = new List<WrittenSetting>();
        void Walk(YamlNode node, string prefix, int line)
        {
            switch (node)
            {
                case YamlMappingNode mapping:
                    foreach (var (key, value) in node.Entries())
                    {
                        Walk(value, prefix.Length == 0 ? key.Value! : $"{prefix}:{key.Value}", key.LineOf());
                    }

                    break;
                case YamlSequenceNode sequence:
                    for (int i = 0; i < sequence.Children.Count; i++)
                    {
                        Walk(sequence.Children[i], $"{prefix}:{i}", sequence.Children[i].LineOf());
                    }

                    break;
                default:
                    result.Add(new(prefix, node.Text(), new DeployLocation(file, line), prefix, IsKey: true));
                    break;
            }
        }

        foreach (var document in YamlNodes.Load(text))
        {
            Walk(document.RootNode, "", document.RootNode.LineOf());
        }

        return result;
    }

    private static ServiceUnit Unit(string name, params IEnumerable<WrittenSetting>[] parts)
    {
        var settings = new List<DeploySetting>();
        var host = new List<DeploySetting>();
        foreach (var (variable, value, source, writtenAs, isKey) in parts.SelectMany(p => p))
        {
            if (isKey)
            {
                settings.Add(new DeploySetting(variable, value, source, writtenAs));
            }
            else if (EnvironmentVariableName.IsHostOrRuntime(variable))
            {
                host.Add(new DeploySetting(variable, value, source, writtenAs));
            }
            else
            {
                settings.Add(new DeploySetting(EnvironmentVariableName.ToKey(variable), value, source, writtenAs));
            }
        }

        return new ServiceUnit(name, settings, host);
    }
}

/// <summary>A setting as a deploy file writes it: an environment variable name, or (<paramref name="IsKey"/>) a configuration key.</summary>
public sealed record WrittenSetting(string Name, string? Value, DeployLocation Source, string WrittenAs, bool IsKey = false);
