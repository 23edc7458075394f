namespace Lookahead.Api.Tests.Deploy;

/// <summary>Container image references: which ones are the service's own image (built from deploy/Dockerfile).</summary>
public static class ImageName
{
    public const string Service = "lookahead";

    /// <summary>The repository's last path segment without tag or digest: <c>registry:5000/team/lookahead:1.2</c> gives <c>lookahead</c>.</summary>
    public static string Repository(string image)
    {
        string name = image.Split('@')[0];
        int slash = name.LastIndexOf('/');
        string last = slash < 0 ? name : name[(slash + 1)..];
        int colon = last.IndexOf(':', StringComparison.Ordinal);
        return colon < 0 ? last : last[..colon];
    }

    public static bool IsService(string? image) => image is not null && Repository(image) == Service;
}
