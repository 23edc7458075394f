using System.Runtime.InteropServices;

namespace Lookahead.Api.Catalog;

/// <summary>
/// Runs one compile on a thread of its own at lower scheduling priority. A compile is seconds of CPU: on a pool
/// thread it would take a thread the small plans' continuations need (the pool adds threads only slowly), and at
/// normal priority it would share the cores evenly with them. On its own thread, niced on Linux, it takes the cores
/// only when plans leave them idle.
/// </summary>
internal static class CompileThread
{
    /// <summary>Linux nice value of a compile thread (0 is normal, 19 the lowest priority).</summary>
    private const int Niceness = 10;

    public static Task<T> Run<T>(Func<T> work)
    {
        var done = new TaskCompletionSource<T>(TaskCreationOptions.RunContinuationsAsynchronously);
        var thread = new Thread(() =>
        {
            LowerPriority();
            try
            {
                done.SetResult(work());
            }
            catch (OperationCanceledException ex)
            {
                done.SetCanceled(ex.CancellationToken);
            }
            catch (Exception ex)
            {
                done.SetException(ex);
            }
        })
        {
            IsBackground = true,
            Name = "compile",
        };
        thread.Start();
        return done.Task;
    }

    /// <summary>
    /// Threads have their own nice value on Linux, and raising it needs no privilege. Elsewhere (or if the call
    /// fails) the compile runs at normal priority, which is still off the pool.
    /// </summary>
    private static void LowerPriority()
    {
        if (!OperatingSystem.IsLinux())
        {
            return;
        }

        try
        {
            _ = setpriority(PriorityOfProcess, gettid(), Niceness);
        }
        catch (Exception ex) when (ex is DllNotFoundException or EntryPointNotFoundException)
        {
            // An older C library without gettid: normal priority.
        }
    }

    /// <summary>PRIO_PROCESS: on Linux, with a thread id, the priority of that one thread.</summary>
    private const int PriorityOfProcess = 0;

    [DllImport("libc", SetLastError = true)]
    private static extern int setpriority(int which, int who, int prio);

    [DllImport("libc")]
    private static extern int gettid();
}
