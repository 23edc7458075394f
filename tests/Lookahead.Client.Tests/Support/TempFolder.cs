namespace Lookahead.Client.Tests.Support;

/// <summary>A temp folder for a test's files, deleted on dispose.</summary>
public sealed class TempFolder : IDisposable
{
    public string Path { get; } = Directory.CreateTempSubdirectory("lookahead-cli-tests-").FullName;

    public string File(string name) => System.IO.Path.Combine(Path, name);

    public void Dispose()
    {
        try
        {
            Directory.Delete(Path, recursive: true);
        }
        catch (IOException)
        {
            // Left for the OS to clean.
        }
    }
}
