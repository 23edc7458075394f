using System.Diagnostics;

namespace Lookahead.Api.Tests.Support;

/// <summary>
/// Makes a file or folder unwritable for the test's own user. Permission bits do not stop root, so as root the
/// path is marked immutable (chattr +i) instead; <see cref="MakeAsync"/> answers null when neither is possible here.
/// </summary>
public sealed class ReadOnlyPath : IAsyncDisposable
{
    private readonly string path;
    private readonly UnixFileMode? previousMode;

    private ReadOnlyPath(string path, UnixFileMode? previousMode)
    {
        this.path = path;
        this.previousMode = previousMode;
    }

    public static async Task<ReadOnlyPath?> MakeAsync(string path)
    {
        if (Environment.UserName == "root")
        {
            return await ChattrAsync("+i", path) ? new ReadOnlyPath(path, null) : null;
        }

        if (OperatingSystem.IsWindows())
        {
            return null;
        }

        var mode = File.GetUnixFileMode(path);
        var readOnly = mode & ~(UnixFileMode.UserWrite | UnixFileMode.GroupWrite | UnixFileMode.OtherWrite);
        File.SetUnixFileMode(path, readOnly);
        return new ReadOnlyPath(path, mode);
    }

    public async ValueTask DisposeAsync()
    {
        if (previousMode is { } mode && !OperatingSystem.IsWindows())
        {
            File.SetUnixFileMode(path, mode);
        }
        else
        {
            await ChattrAsync("-i", path);
        }
    }

    private static async Task<bool> ChattrAsync(string flag, string path)
    {
        try
        {
            var start = new ProcessStartInfo("chattr") { RedirectStandardError = true, UseShellExecute = false };
            start.ArgumentList.Add(flag);
            start.ArgumentList.Add(path);
            using var process = Process.Start(start)!;
            await process.StandardError.ReadToEndAsync();
            await process.WaitForExitAsync();
            return process.ExitCode == 0;
        }
        catch (System.ComponentModel.Win32Exception)
        {
            return false;
        }
    }
}
