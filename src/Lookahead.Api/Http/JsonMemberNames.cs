using System.Text.Json.Serialization.Metadata;

namespace Lookahead.Api.Http;

/// <summary>The member names an object at a field path accepts, read from the serializer's own metadata (for hints).</summary>
public static class JsonMemberNames
{
    /// <param name="root">The type the whole body is read as.</param>
    /// <param name="path">A field path as the service writes it ("cost", "references[0]", "" for the body).</param>
    /// <returns>The wire names, or null when the path does not lead to an object the metadata describes.</returns>
    public static IReadOnlyList<string>? At(JsonTypeInfo root, string path) =>
        TypeAt(root, path) is { Kind: JsonTypeInfoKind.Object } found ? [.. found.Properties.Select(p => p.Name)] : null;

    /// <summary>The metadata of the value at a field path, or null when the path leaves what the metadata describes.</summary>
    public static JsonTypeInfo? TypeAt(JsonTypeInfo root, string path)
    {
        JsonTypeInfo current = root;
        foreach (string segment in path.Split('.', StringSplitOptions.RemoveEmptyEntries))
        {
            int bracket = segment.IndexOf('[', StringComparison.Ordinal);
            string name = bracket < 0 ? segment : segment[..bracket];
            var member = current.Kind == JsonTypeInfoKind.Object ? current.Properties.FirstOrDefault(p => p.Name == name) : null;
            if (member is null)
            {
                return null;
            }

            current = current.Options.GetTypeInfo(member.PropertyType);
            for (int index = bracket; index >= 0; index = segment.IndexOf('[', index + 1))
            {
                if (current.ElementType is not { } element)
                {
                    return null;
                }

                current = current.Options.GetTypeInfo(element);
            }
        }

        return current;
    }
}
