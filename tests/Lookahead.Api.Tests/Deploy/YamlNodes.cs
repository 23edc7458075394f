using YamlDotNet.RepresentationModel;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>Reading YAML documents by key, with the line of each node for messages.</summary>
public static class YamlNodes
{
    /// <summary>Every document of a YAML (or JSON) text; a syntax error names the line.</summary>
    /// <exception cref="YamlDotNet.Core.YamlException">The text is not well-formed YAML.</exception>
    public static IReadOnlyList<YamlDocument> Load(string text)
    {
        var stream = new YamlStream();
        stream.Load(new StringReader(text));
        return [.. stream.Documents];
    }

    public static int LineOf(this YamlNode node) => checked((int)node.Start.Line);

    /// <summary>The value under <paramref name="key"/> of a mapping, or null when the node is no mapping or has no such key.</summary>
    public static YamlNode? Get(this YamlNode? node, string key)
    {
        if (node is not YamlMappingNode mapping)
        {
            return null;
        }

        return mapping.Children.TryGetValue(new YamlScalarNode(key), out var value) ? value : null;
    }

    /// <summary>Follows a path of keys (<c>"spec", "template", "spec"</c>).</summary>
    public static YamlNode? At(this YamlNode? node, params string[] path)
    {
        foreach (string key in path)
        {
            node = node.Get(key);
        }

        return node;
    }

    /// <summary>The scalar text, or null when the node is missing, not a scalar, or an explicit null.</summary>
    public static string? Text(this YamlNode? node) =>
        node is YamlScalarNode { Value: { } value } scalar && !(scalar.Style == YamlDotNet.Core.ScalarStyle.Plain && value is "~" or "null" or "") ? value : null;

    public static IEnumerable<YamlNode> Items(this YamlNode? node) => node is YamlSequenceNode sequence ? sequence.Children : [];

    public static IEnumerable<(YamlScalarNode Key, YamlNode Value)> Entries(this YamlNode? node) =>
        node is YamlMappingNode mapping ? mapping.Children.Select(c => ((YamlScalarNode)c.Key, c.Value)) : [];
}
