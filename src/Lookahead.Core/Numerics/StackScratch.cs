namespace Lookahead.Core.Numerics;

/// <summary>
/// How much request-time scratch may go on the stack. Usage:
/// <c>Span&lt;double&gt; v = StackScratch.Fits(n) ? stackalloc double[n] : new double[n];</c>
/// (a helper cannot return stack memory, so the choice is a predicate).
/// </summary>
internal static class StackScratch
{
    /// <summary>
    /// Largest buffer of doubles put on the stack: 2 KB. The adjoint gradient holds five such buffers at once
    /// (10 KB), far inside a thread's stack even under a deep ASP.NET call chain; a larger vector means O(n²)
    /// work per use, next to which one heap allocation is noise.
    /// </summary>
    public const int MaxDoubles = 256;

    /// <summary>True when <paramref name="count"/> doubles may be stack-allocated.</summary>
    public static bool Fits(int count) => count <= MaxDoubles;
}
