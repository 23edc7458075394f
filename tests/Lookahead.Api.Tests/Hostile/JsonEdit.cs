using System.Text;
using System.Text.Json.Nodes;
using System.Text.RegularExpressions;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>
/// Edits of a JSON document addressed by the same paths the service writes into its problems ("plant.a[0][1]"),
/// so a mutation and the error it must draw name one field. A value can be replaced by raw text that is not JSON at
/// all (NaN, 1e400, a broken token): JsonNode cannot hold such text, so a marker string is written and swapped.
/// </summary>
public static partial class JsonEdit
{
    private const string Marker = "@@hostile-value@@";

    /// <summary>Paths of every number under <paramref name="root"/> (the path of root itself is <paramref name="prefix"/>).</summary>
    public static List<string> NumberPaths(JsonNode? root, string prefix = "")
    {
        var found = new List<string>();
        Walk(root, prefix, found, n => n is JsonValue v && v.GetValueKind() == System.Text.Json.JsonValueKind.Number);
        return found;
    }

    /// <summary>Paths of every string under <paramref name="root"/>.</summary>
    public static List<string> StringPaths(JsonNode? root, string prefix = "")
    {
        var found = new List<string>();
        Walk(root, prefix, found, n => n is JsonValue v && v.GetValueKind() == System.Text.Json.JsonValueKind.String);
        return found;
    }

    /// <summary>Paths of every object under <paramref name="root"/>, root included.</summary>
    public static List<string> ObjectPaths(JsonNode? root, string prefix = "")
    {
        var found = new List<string>();
        Walk(root, prefix, found, n => n is JsonObject);
        return found;
    }

    /// <summary>The node at <paramref name="path"/>, or null when nothing is there.</summary>
    public static JsonNode? At(JsonNode root, string path)
    {
        JsonNode? node = root;
        foreach (var segment in Segments(path))
        {
            node = segment switch
            {
                string key when node is JsonObject o => o[key],
                int index when node is JsonArray a && index < a.Count => a[index],
                _ => null,
            };
            if (node is null)
            {
                return null;
            }
        }

        return node;
    }

    /// <summary>The document's text with the value at <paramref name="path"/> replaced by <paramref name="raw"/>, written as is.</summary>
    public static string WithRaw(JsonNode document, string path, string raw)
    {
        var copy = document.DeepClone();
        Set(copy, path, JsonValue.Create(Marker));
        return copy.ToJsonString().Replace($"\"{Marker}\"", raw, StringComparison.Ordinal);
    }

    /// <summary>A copy with the value at <paramref name="path"/> replaced (null writes JSON null).</summary>
    public static JsonNode With(JsonNode document, string path, JsonNode? value)
    {
        var copy = document.DeepClone();
        Set(copy, path, value);
        return copy;
    }

    /// <summary>A copy without the member at <paramref name="path"/> (an object member or an array entry).</summary>
    public static JsonNode Without(JsonNode document, string path)
    {
        var copy = document.DeepClone();
        var (parent, last) = Parent(copy, path);
        if (last is string key)
        {
            ((JsonObject)parent).Remove(key);
        }
        else
        {
            ((JsonArray)parent).RemoveAt((int)last);
        }

        return copy;
    }

    /// <summary>The text with the object at <paramref name="objectPath"/> given an extra member written as raw text (duplicates allowed).</summary>
    public static string WithExtraMember(JsonNode document, string objectPath, string name, string rawValue)
    {
        var copy = document.DeepClone();
        var target = objectPath.Length == 0 ? copy : At(copy, objectPath)!;
        var obj = (JsonObject)target;
        string unique = Marker + "member";
        obj[unique] = JsonValue.Create(Marker);
        return copy.ToJsonString().Replace($"\"{unique}\":\"{Marker}\"", $"{Quote(name)}:{rawValue}", StringComparison.Ordinal);
    }

    /// <summary>The text with the first member of the object at <paramref name="objectPath"/> written twice.</summary>
    public static string WithDuplicatedFirstMember(JsonNode document, string objectPath)
    {
        var target = (JsonObject)(objectPath.Length == 0 ? document : At(document, objectPath)!);
        var first = target.First();
        return WithExtraMember(document, objectPath, first.Key, first.Value?.ToJsonString() ?? "null");
    }

    /// <summary>A JSON string literal; unlike JsonNode, it writes control characters and lone surrogates as given escapes.</summary>
    public static string Quote(string value)
    {
        var text = new StringBuilder("\"");
        foreach (char c in value)
        {
            text.Append(c switch
            {
                '"' => "\\\"",
                '\\' => "\\\\",
                _ when c < 0x20 || c == 0x7f || char.IsSurrogate(c) || (c >= 0x80 && c < 0xa0) => $"\\u{(int)c:x4}",
                _ => c.ToString(),
            });
        }

        return text.Append('"').ToString();
    }

    /// <summary>The top-level field of a path: "plant" for "plant.a[0][1]", "state" for "state[2]".</summary>
    public static string Field(string path) => Segments(path).FirstOrDefault() as string ?? "";

    private static void Walk(JsonNode? node, string path, List<string> found, Func<JsonNode, bool> take)
    {
        if (node is null)
        {
            return;
        }

        if (take(node))
        {
            found.Add(path);
        }

        switch (node)
        {
            case JsonObject o:
                foreach (var (key, child) in o)
                {
                    Walk(child, path.Length == 0 ? key : $"{path}.{key}", found, take);
                }

                break;
            case JsonArray a:
                for (int i = 0; i < a.Count; i++)
                {
                    Walk(a[i], $"{path}[{i}]", found, take);
                }

                break;
        }
    }

    private static void Set(JsonNode root, string path, JsonNode? value)
    {
        var (parent, last) = Parent(root, path);
        if (last is string key)
        {
            ((JsonObject)parent)[key] = value;
        }
        else
        {
            ((JsonArray)parent)[(int)last] = value;
        }
    }

    private static (JsonNode Parent, object Last) Parent(JsonNode root, string path)
    {
        var segments = Segments(path).ToList();
        JsonNode node = root;
        foreach (var segment in segments.Take(segments.Count - 1))
        {
            node = segment is string key ? node[key]! : node[(int)segment]!;
        }

        return (node, segments[^1]);
    }

    private static IEnumerable<object> Segments(string path)
    {
        foreach (Match match in Segment().Matches(path))
        {
            yield return match.Groups["index"].Success ? int.Parse(match.Groups["index"].Value) : match.Groups["key"].Value;
        }
    }

    [GeneratedRegex(@"(?<key>[^.\[\]]+)|\[(?<index>\d+)\]")]
    private static partial Regex Segment();
}
