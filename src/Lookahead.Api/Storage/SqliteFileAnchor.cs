namespace Lookahead.Api.Storage;

/// <summary>
/// Tells whether the SQLite file the store opened is still the one at its path. A connection in WAL mode keeps
/// reading and committing to a file that was deleted or renamed over (its inode lives while open), so writes would be
/// acknowledged and then lost at the next start. The anchor holds the original file open and, on Linux, reads where
/// that handle now points (/proc/self/fd): " (deleted)" or another path means the store's file is gone. Elsewhere it
/// falls back to the path still existing. One readlink per call: cheap enough to run before every store operation.
/// </summary>
/// <remarks>
/// The handle is only closed when the store is disposed: closing a second descriptor on a SQLite file drops the
/// process's POSIX locks on it, which must not happen while connections are in use.
/// </remarks>
internal sealed class SqliteFileAnchor : IDisposable
{
    private readonly FileStream handle;
    private readonly string path;
    private readonly string? originalTarget;
    private volatile bool moved;

    private SqliteFileAnchor(FileStream handle, string path)
    {
        this.handle = handle;
        this.path = path;
        originalTarget = Target();
    }

    /// <summary>Anchors the file now at <paramref name="path"/>, which must exist.</summary>
    public static SqliteFileAnchor Take(string path) =>
        new(new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete), path);

    /// <summary>False once the file has been deleted, renamed or replaced; stays false (a file put back later is another file).</summary>
    public bool InPlace()
    {
        if (moved)
        {
            return false;
        }

        bool inPlace = File.Exists(path) && (originalTarget is null || Target() == originalTarget);
        moved = !inPlace;
        return inPlace;
    }

    public void Dispose() => handle.Dispose();

    private string? Target()
    {
        if (!OperatingSystem.IsLinux())
        {
            return null;
        }

        try
        {
            return new FileInfo($"/proc/self/fd/{handle.SafeFileHandle.DangerousGetHandle()}").LinkTarget;
        }
        catch (IOException)
        {
            return null;
        }
    }
}
